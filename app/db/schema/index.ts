export * from "./auth";
export * from "./procedures";
export * from "./recordings";
export * from "./search";
export * from "./test-records";
export * from "./builds";
export * from "./captions";
export * from "./storage";
