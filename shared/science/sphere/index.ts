export { erfc, logGamma, regularizedUpperGamma } from "./incomplete-gamma";
export {
  checkSphereRadius,
  gaussianChargeBeyond,
  gaussianTailRadiusBohr,
  requiredSphereRadius,
  type SphereCheck,
  type SphereRadiusResult,
} from "./sphere-radius";
