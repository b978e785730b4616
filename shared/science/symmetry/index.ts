export { ABELIAN_TABLES, type AbelianGroupSymbol, type AbelianTable } from "./abelian-tables";
export { classifyPointGroup, describeOperation, type OperationLabel, type PointGroupName } from "./classify";
export { irrepComparator, normalizeIrrepLabel } from "./irrep-order";
export { findSymmetryOperations, operationOrder, type SymmetryOperationRaw } from "./operations";
export {
  type AbelianSubgroup,
  analyzeSymmetry,
  DEFAULT_SYMMETRY_TOLERANCE_ANGSTROM,
  type SymmetryAnalysis,
  type SymmetryOperation,
} from "./point-group";
