export * from "./auth";
export * from "./procedures";
