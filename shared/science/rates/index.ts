export * from "./arrhenius-fit";
export * from "./maxwellian-rate";
