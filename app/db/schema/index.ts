export * from "./auth";
