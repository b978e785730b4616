export {
  buildBaseGrid,
  buildEnergyGrid,
  linearGrid,
  logGrid,
  refineAroundThresholds,
  sortUniqueEnergies,
  thresholdOffsetsEv,
} from "./energy-grid";
