/**
 * Formulas as people read them: the Hill text the science core stores ("H[2H]O") shown with the mass
 * number as a superscript before the symbol and the count as a subscript (H²HO, ²H₂O) — the usual way of
 * writing isotopes in chemistry (common practice); the stored text itself is left as it is.
 */
import { render } from "@testing-library/react";
import { describe, expect, it } from "vitest";
import { Formula, formulaParts, formulaText } from "@/lib/formula";

describe("formula display", () => {
  it("reads the bracketed isotopes and counts of a Hill formula", () => {
    expect(formulaParts("H[2H]O")).toEqual([
      { symbol: "H", massNumber: null, count: 1 },
      { symbol: "H", massNumber: 2, count: 1 },
      { symbol: "O", massNumber: null, count: 1 },
    ]);
    expect(formulaParts("C[13C]H3[2H]3")).toEqual([
      { symbol: "C", massNumber: null, count: 1 },
      { symbol: "C", massNumber: 13, count: 1 },
      { symbol: "H", massNumber: null, count: 3 },
      { symbol: "H", massNumber: 2, count: 3 },
    ]);
    expect(formulaParts("not a formula")).toBeNull();
    expect(formulaParts("")).toBeNull();
  });

  it("writes text with Unicode super- and subscripts", () => {
    expect(formulaText("H[2H]O")).toBe("H²HO");
    expect(formulaText("[2H]2O")).toBe("²H₂O");
    expect(formulaText("CH3[2H]")).toBe("CH₃²H");
    expect(formulaText("[235U]F6")).toBe("²³⁵UF₆");
    expect(formulaText("H2O")).toBe("H₂O");
    // What is not a formula is shown as it came.
    expect(formulaText("H[2H")).toBe("H[2H");
  });

  it("renders the mass number as a superscript and the count as a subscript", () => {
    const { container } = render(<Formula formula="[2H]2O" />);
    expect(container.querySelector("sup")?.textContent).toBe("2");
    expect(container.querySelector("sub")?.textContent).toBe("2");
    expect(container.textContent).toBe("2H2O");
  });
});
