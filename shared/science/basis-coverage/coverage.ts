/**
 * Which atoms of a target a basis-set family does not cover — for warnings in the UI and the CLI before a
 * job is queued. Data and its caveats: ./basis-data.ts.
 */
import { basisCoverageRequestSchema, parseTargetInput } from "../../schemas/science-target";
import { getElement } from "../elements/isotopes";
import { ScienceInputError } from "../errors";
import { BASIS_FAMILIES, type BasisFamilyCoverage } from "./basis-data";

const normaliseName = (name: string) => name.trim().toLowerCase().replace(/\s+/g, "");

/**
 * Finds a basis family by name or alias (case-insensitive; "6-31g(d)" is 6-31G*).
 *
 * @throws ScienceInputError for an unknown name, listing the known ones
 */
export function getBasisFamily(name: string): BasisFamilyCoverage {
  const key = normaliseName(name);
  const family = BASIS_FAMILIES.find(
    (f) => normaliseName(f.name) === key || f.aliases.some((alias) => normaliseName(alias) === key),
  );
  if (!family) {
    throw new ScienceInputError(
      `Unknown basis set "${name}". Known: ${BASIS_FAMILIES.map((f) => f.name).join(", ")}.`,
      { name },
    );
  }
  return family;
}

const inRanges = (z: number, ranges: readonly [number, number][]) =>
  ranges.some(([lo, hi]) => z >= lo && z <= hi);

export interface CoverageAtom {
  /** 1-based atom index. */
  index: number;
  symbol: string;
  atomicNumber: number;
}

export interface BasisCoverageReport {
  basis: string;
  /** Atoms whose element the basis does not define. */
  uncovered: CoverageAtom[];
  /** Atoms whose element may or may not be defined (see the data file's caveats). */
  uncertain: CoverageAtom[];
  /** Atoms described with an effective core potential. */
  withEcp: CoverageAtom[];
  /** True when no atom is uncovered. */
  covered: boolean;
}

/**
 * Reports the atoms a basis family does not (or may not) cover and the atoms that get an ECP.
 *
 * @param basis - basis name, e.g. "aug-cc-pVTZ"
 * @param symbols - element symbol of each atom, in target order
 * @returns uncovered, uncertain and ECP atoms (1-based indices)
 * @throws ScienceInputError for an unknown basis or element
 */
export function basisCoverage(basis: string, symbols: readonly string[]): BasisCoverageReport {
  const request = parseTargetInput(basisCoverageRequestSchema, { basis, symbols }, "basis coverage request");
  const family = getBasisFamily(request.basis);
  const report: BasisCoverageReport = {
    basis: family.name,
    uncovered: [],
    uncertain: [],
    withEcp: [],
    covered: true,
  };
  request.symbols.forEach((symbol, i) => {
    const element = getElement(symbol);
    const atom = { index: i + 1, symbol: element.symbol, atomicNumber: element.atomicNumber };
    if (!inRanges(element.atomicNumber, family.covered)) report.uncovered.push(atom);
    else if (inRanges(element.atomicNumber, family.uncertain)) report.uncertain.push(atom);
    if (
      family.ecpFromZ !== null &&
      element.atomicNumber >= family.ecpFromZ &&
      inRanges(element.atomicNumber, family.covered)
    ) {
      report.withEcp.push(atom);
    }
  });
  report.covered = report.uncovered.length === 0;
  return report;
}

/** Names of the basis families known to the coverage check. */
export function listBasisFamilies(): string[] {
  return BASIS_FAMILIES.map((f) => f.name);
}
