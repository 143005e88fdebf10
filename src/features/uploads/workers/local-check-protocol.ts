import type { ParseWarning } from "@shared/compute/canonical";
import type { Dialect, ScanResult } from "@shared/sniff";

export interface LocalCheckRequest {
  file: File;
  /** The platform's latest saved map, if any. */
  savedMap: unknown | null;
}

export interface LocalQc {
  rows: number;
  timeMin: number;
  timeMax: number;
  /** Per variable: counts indexed by flag value (1 pass, 2 not evaluated, 3 suspect, 4 fail, 9 missing). */
  flagCounts: Record<string, number[]>;
  warningCount: number;
  warnings: ParseWarning[];
}

export type LocalCheckMessage =
  | { type: "refused"; message: string }
  | { type: "preview"; dialect: Dialect; header: string[] | null; rows: string[][]; lines: number[]; mapSource: "platform" | "suggested" | null; mapProblems: string[] }
  | { type: "progress"; bytes: number; total: number }
  | { type: "done"; scan: ScanResult; qc: LocalQc | null; mapSource: "platform" | "suggested" | null }
  | { type: "error"; message: string };
