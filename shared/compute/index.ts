/** Tauline's science engine: QC and air–sea diagnostics, pure and column-wise. */
export * from "./flags";
export * from "./directions";
export * from "./physics";
export * from "./geodesy";
export * from "./canonical";
export * from "./diagnostics";
export * from "./engine";
export * from "./array";
export * from "./timing";
