export * from "./exponential-moments";
export * from "./incomplete-gamma";
