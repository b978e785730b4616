export * from "./dipole-born";
