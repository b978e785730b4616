/**
 * Irrep labels in the order character tables list them. Reference for every expected order: F. A. Cotton,
 * "Chemical Applications of Group Theory", 3rd ed. (1990), Appendix IIA (character tables of Cs, Ci, C2,
 * C2v, C2h, D2 and D2h).
 */
import { describe, expect, it } from "vitest";
import { orderTimings } from "../../../server/execution/timings-order";
import { irrepComparator, normalizeIrrepLabel } from "../../../shared/science/symmetry";

const sorted = (labels: string[]) => [...labels].sort(irrepComparator(labels));

describe("irrep order (Cotton, Appendix IIA)", () => {
  it("puts A' before A\" in Cs, where alphabetical order has them the other way round", () => {
    expect(['A"', "A'"].sort()).toEqual(['A"', "A'"]);
    expect(sorted(['A"', "A'"])).toEqual(["A'", 'A"']);
  });

  it("orders D2h as Ag, B1g, B2g, B3g, Au, B1u, B2u, B3u", () => {
    const d2h = ["Ag", "B1g", "B2g", "B3g", "Au", "B1u", "B2u", "B3u"];
    expect(sorted([...d2h].reverse())).toEqual(d2h);
    // Alphabetically Au would come second.
    expect(sorted(["B1u", "Au", "Ag", "B3g"])).toEqual(["Ag", "B3g", "Au", "B1u"]);
  });

  it("orders C2v, C2h and D2 as their tables do", () => {
    expect(sorted(["B2", "A2", "B1", "A1"])).toEqual(["A1", "A2", "B1", "B2"]);
    expect(sorted(["Bu", "Au", "Bg", "Ag"])).toEqual(["Ag", "Bg", "Au", "Bu"]);
    expect(sorted(["B3", "B1", "A", "B2"])).toEqual(["A", "B1", "B2", "B3"]);
  });

  it("reads labels as codes print them: lower case, two primes, typographic primes", () => {
    expect(normalizeIrrepLabel("b1u")).toBe("B1u");
    expect(normalizeIrrepLabel("A''")).toBe('A"');
    expect(normalizeIrrepLabel("A″")).toBe('A"');
    expect(normalizeIrrepLabel(" a′ ")).toBe("A'");
    expect(sorted(["a''", "a'"])).toEqual(["a'", "a''"]);
    expect(sorted(["bu", "ag", "au"])).toEqual(["ag", "au", "bu"]);
  });

  it("falls back to natural order for labels no table holds, after the ones a table orders", () => {
    expect(sorted(["sym10", "sym2", "sym1"])).toEqual(["sym1", "sym2", "sym10"]);
    // A set no single table holds (a C2v label with a D2h one): natural order.
    expect(sorted(["B1g", "A1", "A2"])).toEqual(["A1", "A2", "B1g"]);
  });
});

describe("orderTimings", () => {
  const plan = { stages: [{ name: "orbitals" }, { name: "scatter" }] } as never;

  it("orders stages as the recipe runs them, and symmetries by table within each stage", () => {
    const timings = [
      { stage: "scatter", symmetry: "B2", durationSeconds: 3 },
      { stage: "scatter", symmetry: "A1", durationSeconds: 1 },
      { stage: "orbitals", symmetry: 'A"', durationSeconds: 5 },
      { stage: "scatter", symmetry: "B1", durationSeconds: 2 },
      { stage: "orbitals", symmetry: "A'", durationSeconds: 4 },
    ];
    expect(orderTimings(timings, plan).map((t) => `${t.stage}/${t.symmetry}`)).toEqual([
      "orbitals/A'",
      'orbitals/A"',
      "scatter/A1",
      "scatter/B1",
      "scatter/B2",
    ]);
  });

  it("puts stages the plan does not name last, and leaves its input untouched", () => {
    const timings = [
      { stage: "extra", symmetry: "A", durationSeconds: 1 },
      { stage: "scatter", symmetry: "A1", durationSeconds: 1 },
    ];
    const copy = structuredClone(timings);
    expect(orderTimings(timings, plan).map((t) => t.stage)).toEqual(["scatter", "extra"]);
    expect(timings).toEqual(copy);
  });
});
