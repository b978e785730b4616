export {
  centreOfMass,
  classifyRotor,
  inertiaTensor,
  principalAxes,
  type RotationalConstants,
  type RotorType,
  rayAsymmetry,
  recentre,
  rotationalConstants,
  totalMassU,
} from "./inertia";
export { hillFormula, type InspectTargetInput, inspectTarget, type TargetInspection } from "./inspect-target";
export { jacobiEigenSymmetric, type Mat3, type Vec3 } from "./linear-algebra";
export { type ParsedAtom, type ParsedGeometry, parseGeometry } from "./parse-geometry";
export {
  type DipoleMoment,
  dipoleFromPartialCharges,
  electronCount,
  nuclearRepulsionHartree,
  resolveMultiplicity,
  shiftDipoleOrigin,
} from "./properties";
export {
  type AtomInput,
  buildTarget,
  isotopeLabel,
  MIN_ATOM_SEPARATION_ANGSTROM,
  type TargetAtom,
} from "./target";
