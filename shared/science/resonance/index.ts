export * from "./breit-wigner-fit";
