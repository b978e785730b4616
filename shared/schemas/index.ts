export * from "./auth";
export * from "./common";
export * from "./groups";
