/**
 * The order in which character tables list irreducible representations (Cotton order), for labels as
 * codes print them. Per-symmetry results and timings read in that order: A' before A", Ag before B1g
 * before Au, A1 before A2 before B1 before B2. Alphabetical order gets these wrong (A" sorts before A').
 */
import { ABELIAN_TABLES, type AbelianGroupSymbol } from "./abelian-tables";

/** Tried in this order: the first table holding every label of a set decides its order. */
const TABLE_ORDER: AbelianGroupSymbol[] = ["D2h", "C2v", "C2h", "D2", "Cs", "Ci", "C2", "C1"];

/**
 * A label as the tables spell it: first letter upper case, the rest lower case ("b1U" → "B1u"), and a
 * double prime written as two primes or as a typographic double prime ("A''", "A″") → `A"`.
 */
export function normalizeIrrepLabel(label: string): string {
  const trimmed = label.trim().replace(/''|″/g, '"').replace(/′/g, "'");
  return trimmed.charAt(0).toUpperCase() + trimmed.slice(1).toLowerCase();
}

/**
 * A comparator for the irrep labels of one set (say, the symmetries one stage reported). The set is
 * placed in the first Abelian table (D2h and its subgroups) that holds all its labels and ordered as
 * that table lists them. Labels no table holds, or a set no single table holds, fall back to natural
 * order ("2A1" before "10A1"), after the labels a table does order.
 */
export function irrepComparator(labels: Iterable<string>): (a: string, b: string) => number {
  const normalized = [...new Set([...labels].map(normalizeIrrepLabel))];
  const table = TABLE_ORDER.map((symbol) => ABELIAN_TABLES[symbol]).find((candidate) =>
    normalized.every((label) => candidate.irreps.some((irrep) => irrep.name === label)),
  );
  const rank = (label: string) => {
    const index = table?.irreps.findIndex((irrep) => irrep.name === normalizeIrrepLabel(label)) ?? -1;
    return index < 0 ? Number.POSITIVE_INFINITY : index;
  };
  const natural = new Intl.Collator("en", { numeric: true, sensitivity: "variant" });
  return (a, b) => {
    const byRank = rank(a) - rank(b);
    return Number.isNaN(byRank) || byRank === 0 ? natural.compare(a, b) : byRank;
  };
}
