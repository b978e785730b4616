export {
  checkSphereRadius,
  gaussianChargeBeyond,
  gaussianTailRadiusBohr,
  requiredSphereRadius,
  type SphereCheck,
  type SphereRadiusResult,
} from "./sphere-radius";
