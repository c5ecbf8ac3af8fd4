import { describe, expect, test } from "vitest";
import { suggestLayout } from "../../../lib/ingest/suggest-layout.ts";

// Invented sample files (not real logger output).
describe("layout guesser: clock zone", () => {
  test.each([
    ["local_time,alt_m,temp_c\n06:40:00,200,15.1\n06:40:02,205,15.0\n", "site"],
    ["utc_time,alt_m,temp_c\n06:40:00,200,15.1\n06:40:02,205,15.0\n", "utc"],
    ["# clock set to local time\ntime,alt_m,temp_c\n06:40:00,200,15.1\n06:40:02,205,15.0\n", "site"],
    ["time,alt_m,temp_c\n06:40:00,200,15.1\n06:40:02,205,15.0\n", "utc"],
    ["local_time,alt_m,temp_c\n2025-07-14 06:40:00,200,15.1\n2025-07-14 06:40:02,205,15.0\n", "site"],
  ])("%j → %s", (text, zone) => {
    const suggestion = suggestLayout(text);
    expect(suggestion.spec.columns.time.clockZone).toBe(zone);
    expect(suggestion.notes.join(" ")).toMatch(/Clock times read/);
  });

  test.each([
    ["seconds,alt_m,temp_c\n0,200,15.1\n2,205,15.0\n"],
    ["time,alt_m,temp_c\n2025-07-14T06:40:00Z,200,15.1\n2025-07-14T06:40:02Z,205,15.0\n"],
  ])("no clock zone where the time carries no clock or its own offset: %j", (text) => {
    expect(suggestLayout(text).spec.columns.time.clockZone).toBeUndefined();
  });
});
