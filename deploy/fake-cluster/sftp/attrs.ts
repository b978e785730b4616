/** File attributes in SFTP form, and the `ls -l` style "longname" of a directory entry. */
import type { Stats } from "node:fs";
import type { Attributes } from "ssh2";

export function toAttrs(stats: Stats): Attributes {
  return {
    mode: stats.mode,
    uid: stats.uid,
    gid: stats.gid,
    size: stats.size,
    atime: Math.floor(stats.atimeMs / 1000),
    mtime: Math.floor(stats.mtimeMs / 1000),
  };
}

const TYPE_LETTERS: [number, string][] = [
  [0o040000, "d"],
  [0o120000, "l"],
  [0o020000, "c"],
  [0o060000, "b"],
  [0o010000, "p"],
  [0o140000, "s"],
];

function modeString(mode: number): string {
  const type = TYPE_LETTERS.find(([bits]) => (mode & 0o170000) === bits)?.[1] ?? "-";
  const triplet = (shift: number, special: number, specialLetter: string) => {
    const bits = (mode >> shift) & 0o7;
    const execute = (bits & 1) !== 0;
    const hasSpecial = (mode & special) !== 0;
    const last = hasSpecial ? (execute ? specialLetter : specialLetter.toUpperCase()) : execute ? "x" : "-";
    return `${bits & 4 ? "r" : "-"}${bits & 2 ? "w" : "-"}${last}`;
  };
  return type + triplet(6, 0o4000, "s") + triplet(3, 0o2000, "s") + triplet(0, 0o1000, "t");
}

const MONTHS = ["Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec"];
/** ls shows the time of day for files changed within about six months, the year otherwise. */
const SIX_MONTHS_MS = 182 * 24 * 3600 * 1000;

function timeString(mtimeMs: number, nowMs: number): string {
  const date = new Date(mtimeMs);
  const day = String(date.getDate()).padStart(2, " ");
  const recent = Math.abs(nowMs - mtimeMs) < SIX_MONTHS_MS;
  const tail = recent
    ? `${String(date.getHours()).padStart(2, "0")}:${String(date.getMinutes()).padStart(2, "0")}`
    : ` ${date.getFullYear()}`;
  return `${MONTHS[date.getMonth()]} ${day} ${tail}`;
}

/** Owners are shown as numeric ids: the fake cluster has no user database of its own. */
export function longName(name: string, stats: Stats, nowMs = Date.now()): string {
  return [
    modeString(stats.mode),
    String(stats.nlink).padStart(4, " "),
    String(stats.uid).padEnd(8, " "),
    String(stats.gid).padEnd(8, " "),
    String(stats.size).padStart(8, " "),
    timeString(stats.mtimeMs, nowMs),
    name,
  ].join(" ");
}
