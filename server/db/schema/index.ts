export * from "./execution";
export * from "./identity";
export * from "./results";
export * from "./targets";
