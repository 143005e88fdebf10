import type { LocalCheckMessage, LocalQc } from "../workers/local-check-protocol";
import type { QcFlag } from "@/components/ui/flag-badge";
import { FlagCountsTable } from "@/components/ui/flag-counts-table";
import { Alert } from "@/components/ui/alert";
import { vocabulary, type MeasuredVariable } from "@shared/vocabulary";
import type { Dialect, ScanResult } from "@shared/sniff";
import { FindingsList } from "./findings-list";
import { PreviewTable } from "./preview-table";
import { describeDelimiter, formatBytes } from "./format";

export interface LocalCheckState {
  fileName: string;
  refused?: string;
  error?: string;
  preview?: Extract<LocalCheckMessage, { type: "preview" }>;
  progress?: { bytes: number; total: number };
  done?: { scan: ScanResult; qc: LocalQc | null };
}

const FLAGS: QcFlag[] = [1, 3, 4, 9, 2];
const iso = (t: number) => (Number.isFinite(t) ? new Date(t * 1000).toISOString().replace(".000Z", "Z") : "—");

function DialectLine({ d }: { d: Dialect }) {
  return (
    <p className="text-sm">
      Read as: <strong>{describeDelimiter(d.delimiter)}</strong>-separated, decimal <strong>{d.decimalMark === "." ? "point" : "comma"}</strong>,{" "}
      {d.headerRow ? <>header on line <strong className="num">{d.headerRow}</strong></> : <strong>no header</strong>}
      {d.skipRows ? <>, <span className="num">{d.skipRows}</span> units line skipped</> : null}, line endings <strong>{d.lineEnding.toUpperCase()}</strong>.
    </p>
  );
}

function QcSummary({ qc, source }: { qc: LocalQc; source: string }) {
  const vars = Object.keys(qc.flagCounts).filter((k) => k in vocabulary) as MeasuredVariable[];
  return (
    <div className="space-y-2">
      <p className="text-sm">
        First QC pass in your browser with {source}: <span className="num">{qc.rows.toLocaleString("en-GB")}</span> records from{" "}
        <span className="num">{iso(qc.timeMin)}</span> to <span className="num">{iso(qc.timeMax)}</span>. The server repeats every check when you process the upload.
      </p>
      <FlagCountsTable
        caption="Records per QC flag and variable, from the browser's first pass"
        flags={FLAGS}
        rows={vars.map((v) => ({ key: v, cells: [vocabulary[v].label], counts: qc.flagCounts[v] ?? {} }))}
      />
      {qc.warningCount ? (
        <Alert tone="attention" title={`${qc.warningCount.toLocaleString("en-GB")} fields could not be read`}>
          <ul className="list-disc pl-5">
            {qc.warnings.map((w, i) => (
              <li key={i}>
                Line <span className="num">{w.line}</span>
                {w.column ? <>, column “{w.column}”</> : null}: {w.message}
              </li>
            ))}
          </ul>
        </Alert>
      ) : null}
    </div>
  );
}

/** What the browser found in the chosen file while it uploads. */
export function LocalCheckPanel({ state }: { state: LocalCheckState }) {
  const { preview, progress, done } = state;
  return (
    <section aria-label="Check in your browser" className="space-y-3 rounded-lg border border-line bg-surface p-4" data-testid="local-check">
      <h3 className="font-semibold">
        Early check of <span className="break-all">{state.fileName}</span> <span className="text-sm font-normal text-muted">(in your browser, nothing sent)</span>
      </h3>
      {state.refused ? <Alert tone="attention" title="This file cannot be used">{state.refused}</Alert> : null}
      {state.error ? <Alert tone="attention">{state.error}</Alert> : null}
      {preview ? (
        <>
          <DialectLine d={preview.dialect} />
          {preview.mapProblems.length ? (
            <Alert tone="attention" title="The platform's saved column map does not fit this file">
              <ul className="list-disc pl-5">
                {preview.mapProblems.slice(0, 5).map((m, i) => (
                  <li key={i}>{m}</li>
                ))}
              </ul>
            </Alert>
          ) : null}
          <details>
            <summary className="cursor-pointer text-sm font-semibold">First {preview.rows.length} rows</summary>
            <div className="mt-2">
              <PreviewTable header={preview.header} rows={preview.rows} lines={preview.lines} caption="First rows of the chosen file" />
            </div>
          </details>
        </>
      ) : null}
      {progress && !done ? (
        <p className="text-sm text-muted" role="status">
          Reading the file: <span className="num">{formatBytes(progress.bytes)}</span> of <span className="num">{formatBytes(progress.total)}</span>
        </p>
      ) : null}
      {done ? (
        <>
          {done.scan.findings.length ? <FindingsList findings={done.scan.findings} /> : <p className="text-sm">No problems found in <span className="num">{done.scan.dataLineCount.toLocaleString("en-GB")}</span> data lines.</p>}
          {done.qc ? <QcSummary qc={done.qc} source={preview?.mapSource === "platform" ? "the platform's saved column map" : "a column map suggested from the headers"} /> : null}
        </>
      ) : null}
    </section>
  );
}
