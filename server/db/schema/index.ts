export * from "./execution";
export * from "./identity";
