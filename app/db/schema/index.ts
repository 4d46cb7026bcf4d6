export * from "./auth";
export * from "./procedures";
export * from "./recordings";
export * from "./search";
