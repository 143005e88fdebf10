import type { QcRunReport, VersionSummaryData } from "@shared/schemas/versions";
import { derivedVocabulary, vocabulary } from "@shared/vocabulary";
import { FlagGlyph, type QcFlag } from "@/components/ui/flag-badge";
import { Table, Td, Th } from "@/components/ui/table";
import { UtcTime } from "@/components/ui/utc-time";
import { testWord } from "@/lib/qc-tests";

const FLAGS: QcFlag[] = [1, 2, 3, 4, 9];
const flagWords: Record<QcFlag, string> = { 1: "pass", 2: "not evaluated", 3: "suspect", 4: "fail", 9: "missing" };
const int = new Intl.NumberFormat("en", { maximumFractionDigits: 0 });
const label = (v: string) => (v in vocabulary ? vocabulary[v as keyof typeof vocabulary].label : (derivedVocabulary[v as keyof typeof derivedVocabulary]?.longName ?? v));
/** Four significant figures, scientific notation for very small or large magnitudes. */
const num = (x: number | null) => (x === null ? "—" : Math.abs(x) !== 0 && (Math.abs(x) < 1e-3 || Math.abs(x) >= 1e6) ? x.toExponential(3) : x.toPrecision(4));
const duration = (s: number) => (s >= 86400 ? `${(s / 86400).toFixed(1)} d` : s >= 3600 ? `${(s / 3600).toFixed(1)} h` : s >= 60 ? `${(s / 60).toFixed(1)} min` : `${s} s`);

function FlagHead({ flag }: { flag: QcFlag }) {
  return (
    <Th numeric title={`QC flag ${flag}: ${flagWords[flag]}`}>
      <span className="inline-flex items-center gap-1">
        <FlagGlyph flag={flag} />
        {flagWords[flag]}
      </span>
    </Th>
  );
}

/** Time coverage and gaps of a version. */
export function CoverageTable({ summary }: { summary: VersionSummaryData }) {
  return (
    <div className="space-y-3">
      <dl className="grid grid-cols-2 gap-x-6 gap-y-1 text-sm sm:grid-cols-4">
        <div>
          <dt className="text-muted">Records</dt>
          <dd className="num">{int.format(summary.rows)}</dd>
        </div>
        <div>
          <dt className="text-muted">From</dt>
          <dd>
            <UtcTime iso={summary.start} seconds />
          </dd>
        </div>
        <div>
          <dt className="text-muted">To</dt>
          <dd>
            <UtcTime iso={summary.end} seconds />
          </dd>
        </div>
        <div>
          <dt className="text-muted">Coverage (sampling interval {summary.intervalS === null ? "unknown" : duration(summary.intervalS)})</dt>
          <dd className="num">{summary.coverage === null ? "—" : `${(summary.coverage * 100).toFixed(2)} %`}</dd>
        </div>
      </dl>
      {summary.gapCount === 0 ? (
        <p className="text-sm text-muted">No gaps longer than the gap factor times the sampling interval.</p>
      ) : (
        <Table caption="Longest gaps in time">
          <thead>
            <tr>
              {summary.platforms.length > 1 ? <Th>Platform</Th> : null}
              <Th>Last record before (UTC)</Th>
              <Th>Next record (UTC)</Th>
              <Th numeric>Length</Th>
            </tr>
          </thead>
          <tbody>
            {summary.gaps.slice(0, 10).map((g) => (
              <tr key={`${g.platform}-${g.from}`}>
                {summary.platforms.length > 1 ? <Td>{g.platform}</Td> : null}
                <Td>
                  <UtcTime iso={g.from} seconds />
                </Td>
                <Td>
                  <UtcTime iso={g.to} seconds />
                </Td>
                <Td numeric>{duration(g.seconds)}</Td>
              </tr>
            ))}
          </tbody>
        </Table>
      )}
      {summary.gapCount > 10 ? <p className="text-sm text-muted">Showing the 10 longest of {int.format(summary.gapCount)} gaps.</p> : null}
    </div>
  );
}

/** Per-variable statistics and flag counts of the whole version. */
export function VariableStatsTable({ summary }: { summary: VersionSummaryData }) {
  return (
    <Table caption="Statistics and QC flag counts per variable">
      <thead>
        <tr>
          <Th>Variable</Th>
          <Th>Unit</Th>
          <Th numeric>Min</Th>
          <Th numeric>Mean</Th>
          <Th numeric>Max</Th>
          <Th numeric>Std dev</Th>
          {FLAGS.map((f) => (
            <FlagHead key={f} flag={f} />
          ))}
        </tr>
      </thead>
      <tbody>
        {summary.variables.map((v) => (
          <tr key={v.variable}>
            <Td>
              <span className="font-medium">{label(v.variable)}</span>
              <span className="block font-mono text-xs text-muted">{v.variable}</span>
            </Td>
            <Td className="font-mono text-xs">{v.unit}</Td>
            <Td numeric>{num(v.min)}</Td>
            <Td numeric>{num(v.mean)}</Td>
            <Td numeric>{num(v.max)}</Td>
            <Td numeric>{num(v.std)}</Td>
            {FLAGS.map((f) => (
              <Td key={f} numeric className={f >= 3 && (v.flags[f] ?? 0) > 0 ? "font-semibold" : undefined}>
                {int.format(v.flags[f] ?? 0)}
              </Td>
            ))}
          </tr>
        ))}
      </tbody>
    </Table>
  );
}

/** Which tests raised suspect or fail, per variable, in this build's records; plus what the build read and stored. */
export function QcRunTable({ run }: { run: QcRunReport }) {
  const rows = Object.entries(run.testCounts).flatMap(([variable, tests]) => Object.entries(tests).map(([test, [suspect, fail]]) => ({ variable, test, suspect, fail })));
  return (
    <div className="space-y-3">
      <dl className="grid grid-cols-2 gap-x-6 gap-y-1 text-sm sm:grid-cols-5">
        <div>
          <dt className="text-muted">Mode</dt>
          <dd>{run.mode === "append" ? "append to the previous version" : "replace (from this upload alone)"}</dd>
        </div>
        <div>
          <dt className="text-muted">Records read</dt>
          <dd className="num">{int.format(run.rowsRead)}</dd>
        </div>
        <div>
          <dt className="text-muted">Records stored</dt>
          <dd className="num">{int.format(run.rowsWritten)}</dd>
        </div>
        <div>
          <dt className="text-muted">Replaced from the previous version</dt>
          <dd className="num">{int.format(run.rowsReplaced)}</dd>
        </div>
        <div>
          <dt className="text-muted">Left out (no usable time)</dt>
          <dd className="num">{int.format(run.rowsDropped)}</dd>
        </div>
      </dl>
      {rows.length === 0 ? (
        <p className="text-sm text-muted">No test raised a suspect or fail flag in this build’s records.</p>
      ) : (
        <Table caption="Suspect and fail flags raised per test and variable">
          <thead>
            <tr>
              <Th>Variable</Th>
              <Th>Test</Th>
              <FlagHead flag={3} />
              <FlagHead flag={4} />
            </tr>
          </thead>
          <tbody>
            {rows.map((r) => (
              <tr key={`${r.variable}-${r.test}`}>
                <Td>
                  {label(r.variable)} <span className="font-mono text-xs text-muted">{r.variable}</span>
                </Td>
                <Td>{testWord(r.test)}</Td>
                <Td numeric>{int.format(r.suspect)}</Td>
                <Td numeric>{int.format(r.fail)}</Td>
              </tr>
            ))}
          </tbody>
        </Table>
      )}
      {run.warningCount > 0 ? (
        <details className="text-sm">
          <summary className="cursor-pointer">
            <span className="num">{int.format(run.warningCount)}</span> problems reading the file{run.warningCount > run.warnings.length ? ` (first ${run.warnings.length} listed)` : ""}
          </summary>
          <ul className="mt-2 space-y-1">
            {run.warnings.map((w, i) => (
              <li key={i}>
                {w.line > 0 ? <>Line <span className="num">{w.line}</span>{w.column ? `, column “${w.column}”` : ""}: </> : null}
                {w.message}
              </li>
            ))}
          </ul>
        </details>
      ) : null}
      <p className="text-xs text-muted">
        Timings: {Object.entries(run.timings).map(([k, s]) => `${k.replace(/_s$/, "").replace(/_/g, " ")} ${s.toFixed(1)} s`).join(" · ")}
      </p>
    </div>
  );
}
