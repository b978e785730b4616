/**
 * Core-hours, the unit allocations and charges are spoken in, and core-seconds, the unit they are stored
 * in (whole core-seconds in bigint columns, so sums and balances are exact).
 *
 * The one rounding rule: core-seconds → core-hours rounds to 4 decimal places. A step of 0.0001 h is
 * 0.36 s, finer than the whole core-second stored, so distinct amounts stay distinct and
 * `coreSecondsFromHours(coreHoursFromSeconds(s)) === s` for every whole `s`; and the API carries
 * 0.0167 rather than 0.016666666666666666.
 */

export const SECONDS_PER_HOUR = 3600;

/** Core-seconds as core-hours, rounded to 4 decimal places. */
export function coreHoursFromSeconds(coreSeconds: number): number {
  return Math.round((coreSeconds / SECONDS_PER_HOUR) * 1e4) / 1e4;
}

/** Core-hours as whole core-seconds, rounded to the nearest (what the database stores). */
export function coreSecondsFromHours(coreHours: number): number {
  return Math.round(coreHours * SECONDS_PER_HOUR);
}
