import { ScienceInputError } from "@shared/science/errors";
import {
  buildBaseGrid,
  buildEnergyGrid,
  linearGrid,
  logGrid,
  refineAroundThresholds,
  sortUniqueEnergies,
  thresholdOffsetsEv,
} from "@shared/science/grids";
import { describe, expect, it } from "vitest";

const isStrictlyIncreasing = (values: number[]) => values.every((v, i) => i === 0 || v > values[i - 1]!);

describe("base grids", () => {
  it("linear by count includes both ends with equal steps (definition)", () => {
    const grid = linearGrid(1, 2, { count: 11 });
    expect(grid).toHaveLength(11);
    expect(grid[0]).toBe(1);
    expect(grid[10]).toBe(2);
    for (const [k, e] of grid.entries()) expect(e).toBeCloseTo(1 + 0.1 * k, 14);
  });

  it("linear by step ends exactly at stop, with a shorter last interval when needed", () => {
    expect(linearGrid(1, 2, { stepEv: 0.25 })).toEqual([1, 1.25, 1.5, 1.75, 2]);
    const uneven = linearGrid(1, 2, { stepEv: 0.3 });
    expect(uneven.map((e) => Number(e.toFixed(12)))).toEqual([1, 1.3, 1.6, 1.9, 2]);
  });

  it("log grid has a constant ratio (stop/start)^(1/(n−1))", () => {
    const grid = logGrid(0.01, 100, 5);
    expect(grid.map((e) => Number(e.toPrecision(12)))).toEqual([0.01, 0.1, 1, 10, 100]);
  });

  it("piecewise grids merge shared end points and sort", () => {
    const grid = buildBaseGrid({
      kind: "piecewise",
      segments: [
        { kind: "log", startEv: 1, stopEv: 10, count: 2 },
        { kind: "linear", startEv: 0.1, stopEv: 1, count: 10 },
      ],
    });
    expect(grid).toHaveLength(11);
    expect(grid[0]).toBe(0.1);
    expect(grid[grid.length - 1]).toBe(10);
    expect(isStrictlyIncreasing(grid)).toBe(true);
  });

  it("rejects invalid specifications with clear messages", () => {
    expect(() => linearGrid(2, 1, { count: 3 })).toThrow(/stopEv must be greater than startEv/);
    expect(() => linearGrid(0, 1, { count: 3 })).toThrow(/collision energies must be > 0 eV/);
    expect(() => logGrid(1, 2, 1)).toThrow(ScienceInputError);
    expect(() => buildBaseGrid({ kind: "linear", startEv: 1, stopEv: 2, count: 3, stepEv: 0.1 })).toThrow(
      /exactly one of count or stepEv/,
    );
    expect(() => linearGrid(1, 1e9, { stepEv: 1 })).toThrow(/more than 1000000 points/);
  });
});

describe("threshold refinement", () => {
  it("uses offsets w(k/n)², uniform in channel momentum √(E − E_t) (Wigner threshold law rationale)", () => {
    const offsets = thresholdOffsetsEv(0.2, 4);
    expect(offsets).toEqual([0.0125, 0.05, 0.1125, 0.2]);
    const momenta = offsets.map(Math.sqrt);
    for (const [i, k] of momenta.entries()) expect(k).toBeCloseTo(Math.sqrt(0.2) * ((i + 1) / 4), 14);
  });

  it("adds points on both sides of each threshold, sorted and unique", () => {
    const base = linearGrid(1, 10, { count: 10 });
    const grid = refineAroundThresholds(base, [{ energyEv: 4.5, halfWidthEv: 0.4, pointsPerSide: 4 }]);
    expect(grid).toHaveLength(18);
    expect(grid).toContain(4.5 + 0.025);
    expect(grid).toContain(4.5 - 0.025);
    expect(grid).not.toContain(4.5);
    expect(isStrictlyIncreasing(grid)).toBe(true);
  });

  it("can include the threshold, drops refinement points outside the base range, merges coincident points", () => {
    const grid = buildEnergyGrid({
      base: { kind: "linear", startEv: 1, stopEv: 2, count: 2 },
      thresholds: [
        { energyEv: 1.05, halfWidthEv: 0.1, pointsPerSide: 2, includeThreshold: true },
        { energyEv: 2, halfWidthEv: 0.1, pointsPerSide: 1, includeThreshold: true },
      ],
    });
    // 1.05 − 0.1 = 0.95 lies below the base grid and is dropped; 2 + 0.1 lies above it.
    expect(grid.map((e) => Number(e.toFixed(12)))).toEqual([1, 1.025, 1.05, 1.075, 1.15, 1.9, 2]);
  });

  it("sortUniqueEnergies merges values equal to 1e-10 relative", () => {
    expect(sortUniqueEnergies([3, 1, 2, 1 + 1e-12, 3])).toEqual([1, 2, 3]);
  });

  it("validates refinements", () => {
    expect(() => refineAroundThresholds([1, 2], [{ energyEv: -1 }])).toThrow(/Invalid threshold refinement/);
    expect(() => refineAroundThresholds([1, 2], [{ energyEv: 1.5, pointsPerSide: 0 }])).toThrow(
      ScienceInputError,
    );
  });
});
