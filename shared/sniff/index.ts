export * from "./encoding";
export * from "./dialect";
export * from "./scan";
export * from "./suggest";
