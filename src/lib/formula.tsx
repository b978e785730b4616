/**
 * Formulas as people read them. The science core writes a Hill formula with an isotope other than the
 * element's most common one in brackets ("H[2H]O", "[13C]H4", "[2H]2O"); that text stays what is stored
 * and sent. On screen the mass number is a superscript before the symbol and a count a subscript after it
 * (H²HO, ¹³CH₄, ²H₂O), the usual way of writing isotopes in chemistry (common practice).
 */

export type FormulaPart = { symbol: string; massNumber: number | null; count: number };

const PART = /\[(\d+)([A-Z][a-z]?)\](\d*)|([A-Z][a-z]?)(\d*)/gy;

/** The formula's parts in order, or null when the text is not a formula written this way. */
export function formulaParts(formula: string): FormulaPart[] | null {
  const parts: FormulaPart[] = [];
  PART.lastIndex = 0;
  while (PART.lastIndex < formula.length) {
    const match = PART.exec(formula);
    if (!match) return null;
    const [, mass, isotopeSymbol, isotopeCount, symbol, count] = match;
    parts.push({
      symbol: isotopeSymbol ?? symbol ?? "",
      massNumber: mass ? Number(mass) : null,
      count: Number((isotopeSymbol ? isotopeCount : count) || "1"),
    });
  }
  return parts.length ? parts : null;
}

const SUPERSCRIPT = "⁰¹²³⁴⁵⁶⁷⁸⁹";
const SUBSCRIPT = "₀₁₂₃₄₅₆₇₈₉";
const digitsIn = (digits: string, n: number) =>
  String(n)
    .split("")
    .map((d) => digits[Number(d)])
    .join("");

/** Plain text with Unicode super- and subscripts ("H²HO", "²H₂O"), for places that hold text only (options, titles). */
export function formulaText(formula: string): string {
  const parts = formulaParts(formula);
  if (!parts) return formula;
  return parts
    .map(
      (part) =>
        `${part.massNumber === null ? "" : digitsIn(SUPERSCRIPT, part.massNumber)}${part.symbol}${
          part.count === 1 ? "" : digitsIn(SUBSCRIPT, part.count)
        }`,
    )
    .join("");
}

/** A formula with the mass numbers as superscripts and the counts as subscripts. */
export function Formula({ formula, className }: { formula: string; className?: string }) {
  const parts = formulaParts(formula);
  if (!parts) return <span className={className}>{formula}</span>;
  return (
    <span className={className}>
      {parts.map((part, i) => (
        // biome-ignore lint/suspicious/noArrayIndexKey: the parts of one formula never reorder.
        <span key={i}>
          {part.massNumber === null ? null : <sup>{part.massNumber}</sup>}
          {part.symbol}
          {part.count === 1 ? null : <sub>{part.count}</sub>}
        </span>
      ))}
    </span>
  );
}
