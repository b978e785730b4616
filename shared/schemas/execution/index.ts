export * from "./allocations";
export * from "./codes";
export * from "./hosts";
export * from "./names";
export * from "./recipes";
export * from "./runs";
