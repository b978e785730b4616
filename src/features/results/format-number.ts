const SUPERSCRIPT: Record<string, string> = {
  "-": "⁻",
  "+": "",
  "0": "⁰",
  "1": "¹",
  "2": "²",
  "3": "³",
  "4": "⁴",
  "5": "⁵",
  "6": "⁶",
  "7": "⁷",
  "8": "⁸",
  "9": "⁹",
};

/**
 * A number with `digits` significant digits, trailing zeros dropped: plain between 10⁻³ and 10⁶
 * ("0.1234", "1234", "100000"), otherwise in powers of ten ("1.234 × 10⁻¹²"), as tables of cross sections and
 * rates are printed.
 */
export function formatSignificant(value: number, digits = 4): string {
  if (Number.isNaN(value)) return "—";
  if (!Number.isFinite(value)) return value > 0 ? "∞" : "−∞";
  if (value === 0) return "0";
  const magnitude = Math.abs(value);
  const sign = value < 0 ? "−" : "";
  if (magnitude >= 1e-3 && magnitude < 1e6) {
    return `${sign}${String(Number(magnitude.toPrecision(digits)))}`;
  }
  const [mantissa = "", exponent = ""] = magnitude.toExponential(digits - 1).split("e");
  const power = [...exponent].map((c) => SUPERSCRIPT[c] ?? c).join("");
  return `${sign}${String(Number(mantissa))} × 10${power}`;
}
