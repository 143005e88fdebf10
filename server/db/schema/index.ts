export * from "./auth";
export * from "./projects";
export * from "./datasets";
