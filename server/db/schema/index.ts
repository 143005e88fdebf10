export * from "./auth";
export * from "./projects";
export * from "./datasets";
export * from "./uploads";
export * from "./curation";
export * from "./records";
export * from "./annotations";
export * from "./tokens";
