export * from "./cross-sections";
export * from "./eigenphase-continuity";
export * from "./t-matrix";
