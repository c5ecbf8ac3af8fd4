import { describe, expect, test } from "vitest";
import { mulberry32, randomInt, randomNormal } from "@/lib/stats";

describe("mulberry32", () => {
  test("same seed gives the same stream; another seed another", () => {
    const a = mulberry32(123);
    const b = mulberry32(123);
    const c = mulberry32(124);
    const sa = Array.from({ length: 20 }, () => a());
    expect(Array.from({ length: 20 }, () => b())).toEqual(sa);
    expect(Array.from({ length: 20 }, () => c())).not.toEqual(sa);
  });

  test("values lie in [0, 1) and look uniform", () => {
    const random = mulberry32(2024);
    const bins = new Array<number>(10).fill(0);
    const draws = 100_000;
    let outside = 0;
    for (let i = 0; i < draws; i++) {
      const x = random();
      if (!(x >= 0 && x < 1)) outside++;
      const k = Math.floor(x * 10);
      bins[k] = (bins[k] ?? 0) + 1;
    }
    expect(outside).toBe(0);
    // χ² with 9 df; 27.88 is the 0.999 quantile [S: chi-square table]
    const expected = draws / 10;
    const chi2 = bins.reduce((s, o) => s + (o - expected) ** 2 / expected, 0);
    expect(chi2).toBeLessThan(27.88);
  });

  test("randomInt and randomNormal", () => {
    const random = mulberry32(9);
    const ints = Array.from({ length: 1000 }, () => randomInt(random, 6));
    expect(Math.min(...ints)).toBe(0);
    expect(Math.max(...ints)).toBe(5);
    const normals = Array.from({ length: 20_000 }, () => randomNormal(random, 10, 2));
    const mean = normals.reduce((s, x) => s + x, 0) / normals.length;
    const sd = Math.sqrt(normals.reduce((s, x) => s + (x - mean) ** 2, 0) / (normals.length - 1));
    // [D] standard error of the mean 2/√20000 ≈ 0.014; 5 SE tolerance
    expect(Math.abs(mean - 10)).toBeLessThan(0.07);
    expect(Math.abs(sd - 2)).toBeLessThan(0.05);
    expect(() => randomInt(random, 0)).toThrow();
    expect(() => mulberry32(Number.NaN)).toThrow();
  });
});
