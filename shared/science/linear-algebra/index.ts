export * from "./complex-symmetric-inverse";
export * from "./dense-matrix";
export * from "./least-squares";
export * from "./lu";
export * from "./symmetric-eigen";
