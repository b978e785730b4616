/**
 * A moment as the runs pages show it: in UTC, named as such, as the date filters (whole UTC days) read
 * it — "2026-12-05 04:54 UTC".
 */
export function formatUtcMinute(iso: string): string {
  const date = new Date(iso);
  if (Number.isNaN(date.getTime())) return iso;
  const text = date.toISOString();
  return `${text.slice(0, 10)} ${text.slice(11, 16)} UTC`;
}

/** The same moment to the second, for a tooltip: "2026-12-05 04:54:07 UTC". */
export function formatUtcSecond(iso: string): string {
  const date = new Date(iso);
  if (Number.isNaN(date.getTime())) return iso;
  const text = date.toISOString();
  return `${text.slice(0, 10)} ${text.slice(11, 19)} UTC`;
}
