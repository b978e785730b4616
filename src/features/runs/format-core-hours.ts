/** Core-hours with two decimals, or three below 1 so that short runs do not read as free; "—" when unknown. */
export function formatCoreHours(value: number | null): string {
  if (value === null) return "—";
  return value.toFixed(Math.abs(value) < 1 && value !== 0 ? 3 : 2);
}
