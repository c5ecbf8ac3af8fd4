import fs from "node:fs";
import { describe, expect, test } from "vitest";
import { BACKUP_MODELS, NOT_BACKED_UP } from "../../../lib/export/backup.ts";

/** Models and their scalar fields with types, read from the checked-in Prisma schema. */
function schemaModels(): Map<string, Map<string, string>> {
  const text = fs.readFileSync(new URL("../../../prisma/schema.prisma", import.meta.url), "utf8");
  const models = new Map<string, Map<string, string>>();
  for (const match of text.matchAll(/^model (\w+) \{([\s\S]*?)^\}/gm)) {
    const fields = new Map<string, string>();
    for (const line of (match[2] ?? "").split("\n")) {
      const m = /^\s+(\w+)\s+(String|Int|Float|Boolean|DateTime|Json|Bytes|BigInt|Decimal)\??(\s|$)/.exec(line);
      if (m) fields.set(m[1] as string, m[2] as string);
    }
    models.set(match[1] as string, fields);
  }
  return models;
}

describe("backup covers the schema", () => {
  const models = schemaModels();
  test("every model is backed up or deliberately left out", () => {
    const covered = new Set([...BACKUP_MODELS.map((m) => m.model), ...NOT_BACKED_UP]);
    expect([...models.keys()].filter((m) => !covered.has(m))).toEqual([]);
    expect(models.size).toBeGreaterThan(15);
  });
  test.each(BACKUP_MODELS.map((m) => [m.model, m] as const))("%s: DateTime and Json columns are the schema's", (name, codec) => {
    const fields = models.get(name);
    expect(fields).toBeDefined();
    const of = (type: string) => [...(fields ?? new Map()).entries()].filter(([, t]) => t === type).map(([f]) => f).sort();
    expect([...codec.dates].sort()).toEqual(of("DateTime"));
    expect([...codec.json].sort()).toEqual(of("Json"));
  });
  test("parents come before children (foreign-key order)", () => {
    const order = BACKUP_MODELS.map((m) => m.model);
    const before = (a: string, b: string) => expect(order.indexOf(a), `${a} before ${b}`).toBeLessThan(order.indexOf(b));
    before("School", "Site");
    before("Sensor", "Calibration");
    before("RawFile", "Flight");
    before("Flight", "AnalysisRun");
    before("AnalysisRun", "ProfileLevel");
    before("AnalysisRun", "FlightSummary");
    before("User", "Membership");
  });
});
