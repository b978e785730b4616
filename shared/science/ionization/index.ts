export * from "./beb";
