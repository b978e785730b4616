/**
 * Core-seconds ↔ core-hours: one rounding rule (4 decimal places) for every amount the API reports.
 * Expected values are the exact quotients s / 3600 worked by hand, rounded half up at the 4th decimal.
 */
import { describe, expect, it } from "vitest";
import { coreHoursFromSeconds, coreSecondsFromHours } from "../../../shared/core-hours";

describe("coreHoursFromSeconds", () => {
  it("rounds to 4 decimal places", () => {
    expect(coreHoursFromSeconds(3600)).toBe(1);
    expect(coreHoursFromSeconds(1800)).toBe(0.5);
    expect(coreHoursFromSeconds(60)).toBe(0.0167); // 0.01666…
    expect(coreHoursFromSeconds(600)).toBe(0.1667); // 0.16666…
    expect(coreHoursFromSeconds(1)).toBe(0.0003); // 0.000277…
    expect(coreHoursFromSeconds(0)).toBe(0);
  });

  it("keeps every whole core-second: converting back gives the stored amount", () => {
    for (const seconds of [0, 1, 2, 59, 60, 61, 3599, 3601, 86_399, 1_000_000_007]) {
      expect(coreSecondsFromHours(coreHoursFromSeconds(seconds))).toBe(seconds);
    }
  });
});

describe("coreSecondsFromHours", () => {
  it("rounds to the nearest whole core-second", () => {
    expect(coreSecondsFromHours(1000)).toBe(3_600_000);
    expect(coreSecondsFromHours(0.0001)).toBe(0); // 0.36 s
    expect(coreSecondsFromHours(0.0002)).toBe(1); // 0.72 s
  });
});
