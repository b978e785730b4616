export { BASIS_FAMILIES, type BasisFamilyCoverage } from "./basis-data";
export {
  type BasisCoverageReport,
  basisCoverage,
  type CoverageAtom,
  getBasisFamily,
  listBasisFamilies,
} from "./coverage";
