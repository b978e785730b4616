export * from "./channel-setup";
export * from "./cross-sections";
export * from "./cross-sections-from-document";
export * from "./eigenphase-continuity";
export * from "./t-matrix";
