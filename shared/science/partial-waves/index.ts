export * from "./cross-sections";
export * from "./phase-shifts";
export * from "./spherical-bessel";
