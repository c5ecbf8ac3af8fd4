import { expect, test } from "vitest";
import { createPrng, mixSeed } from "@/seed/prng";

const draw = (seed: number, n: number) => {
  const rng = createPrng(seed);
  return Array.from({ length: n }, () => rng.next());
};

test("same seed, same sequence; different seed, different sequence", () => {
  expect(draw(7, 100)).toEqual(draw(7, 100));
  expect(draw(7, 100)).not.toEqual(draw(8, 100));
});

test("uniforms lie in [0, 1) with mean near 1/2 and variance near 1/12", () => {
  const values = draw(123, 20_000);
  expect(Math.min(...values)).toBeGreaterThanOrEqual(0);
  expect(Math.max(...values)).toBeLessThan(1);
  const mean = values.reduce((s, v) => s + v, 0) / values.length;
  const variance = values.reduce((s, v) => s + (v - mean) ** 2, 0) / values.length;
  // [D] uniform(0,1): mean 1/2, variance 1/12; 20,000 draws give standard errors ≈ 0.002 and 0.0006.
  expect(mean).toBeCloseTo(0.5, 2);
  expect(variance).toBeCloseTo(1 / 12, 2);
});

test("normal deviates have the requested mean and standard deviation", () => {
  const rng = createPrng(5);
  const values = Array.from({ length: 20_000 }, () => rng.normal(10, 2));
  const mean = values.reduce((s, v) => s + v, 0) / values.length;
  const sd = Math.sqrt(values.reduce((s, v) => s + (v - mean) ** 2, 0) / values.length);
  expect(mean).toBeCloseTo(10, 1);
  expect(sd).toBeCloseTo(2, 1);
  expect(values.every(Number.isFinite)).toBe(true);
});

test("int covers both ends; pick refuses an empty list", () => {
  const rng = createPrng(9);
  const ints = new Set(Array.from({ length: 500 }, () => rng.int(1, 3)));
  expect([...ints].sort()).toEqual([1, 2, 3]);
  expect(() => rng.pick([])).toThrow();
});

test("fork gives a stream that does not depend on draws already made", () => {
  const a = createPrng(11);
  const b = createPrng(11);
  b.next();
  b.next();
  expect(a.fork(3).next()).toBe(b.fork(3).next());
  expect(a.fork(3).next()).not.toBe(a.fork(4).next());
  expect(mixSeed(1, 2)).not.toBe(mixSeed(2, 1));
});
