import { derivedVocabulary, type DerivedVariable, type MeasuredVariable } from "../../shared/vocabulary";
import type { EngineBlock } from "../../shared/compute/engine";

/** Formats a number for CSV: 7 significant digits, empty for NaN. */
export function formatNumber(x: number): string {
  if (x !== x) return "";
  if (x === 0 || !Number.isFinite(x)) return String(x);
  return String(Number(x.toPrecision(7)));
}

function iso(t: number): string {
  if (!Number.isFinite(t)) return "";
  const ms = Math.round(t * 1000);
  const s = new Date(ms).toISOString();
  return ms % 1000 === 0 ? s.replace(".000Z", "Z") : s;
}

/** Column layout of the output CSV: time, platform id, then each variable followed by its `<name>_qc` flag. */
export function outputColumns(measured: readonly MeasuredVariable[], derived: readonly DerivedVariable[], withPlatform: boolean): string[] {
  const cols = ["time"];
  if (withPlatform) cols.push("platform_id");
  for (const v of measured) cols.push(v, `${v}_qc`);
  for (const d of derived) cols.push(derivedVocabulary[d].name, `${derivedVocabulary[d].name}_qc`);
  return cols;
}

/** Renders one engine block as CSV lines (no header). */
export function blockToCsv(b: EngineBlock, measured: readonly MeasuredVariable[], derived: readonly DerivedVariable[], platformIds: string[] | null): string {
  const parts: string[] = new Array(b.n);
  for (let i = 0; i < b.n; i++) {
    const row: string[] = [iso(b.time[i]!)];
    if (platformIds) row.push(b.platform ? (platformIds[b.platform[i]!] ?? "") : "");
    for (const v of measured) row.push(formatNumber(b.values[v]![i]!), String(b.flags[v]![i]!));
    for (const d of derived) {
      const val = b.derived[d];
      const fl = b.derivedFlags[d];
      row.push(val ? formatNumber(val[i]!) : "", fl ? String(fl[i]!) : "9");
    }
    parts[i] = row.join(",");
  }
  return parts.length ? parts.join("\n") + "\n" : "";
}
