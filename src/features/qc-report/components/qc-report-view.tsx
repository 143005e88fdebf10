import type { QcReport } from "@shared/schemas/explore";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { EmptyState } from "@/components/ui/empty-state";
import { FlagBadge, type QcFlag } from "@/components/ui/flag-badge";
import { FlagCountsTable } from "@/components/ui/flag-counts-table";
import { Loading } from "@/components/ui/loading";
import { Table, Td, Th, Tr } from "@/components/ui/table";
import { getErrorMessage } from "@/lib/api-client";
import { testWord } from "@/lib/qc-tests";
import { aroundStretch } from "@/lib/stretch-window";
import { formatUtc } from "@/lib/format";
import { useQcReport } from "../api/get-qc-report";

const FLAGS: QcFlag[] = [1, 2, 3, 4, 9];

/** Fill per flag in the timeline: colour AND pattern (pass solid light, suspect hatched, fail cross-hatched, missing empty). */
function Patterns() {
  return (
    <defs>
      <pattern id="qc-suspect" width="5" height="5" patternUnits="userSpaceOnUse" patternTransform="rotate(45)">
        <rect width="5" height="5" fill="var(--t-signal-soft)" />
        <line x1="0" y1="0" x2="0" y2="5" stroke="var(--t-flag-suspect)" strokeWidth="3" />
      </pattern>
      <pattern id="qc-fail" width="5" height="5" patternUnits="userSpaceOnUse">
        <rect width="5" height="5" fill="var(--t-flag-fail)" />
        <path d="M0 0l5 5M5 0l-5 5" stroke="var(--t-surface)" strokeWidth="1" />
      </pattern>
    </defs>
  );
}
const fillOf = (f: number) => (f === 4 ? "url(#qc-fail)" : f === 3 ? "url(#qc-suspect)" : f === 1 ? "var(--t-flag-pass)" : f === 2 ? "var(--t-flag-ne)" : "none");
const opacityOf = (f: number) => (f === 1 ? 0.35 : f === 2 ? 0.3 : 1);

function Swatch({ flag }: { flag: number }) {
  return (
    <svg aria-hidden viewBox="0 0 14 10" className="h-2.5 w-3.5">
      <Patterns />
      <rect x="0.5" y="0.5" width="13" height="9" fill={fillOf(flag)} fillOpacity={opacityOf(flag)} stroke="var(--t-border)" />
    </svg>
  );
}

/** The variable (and a fleet's platform) whose plot to bring into view. */
type PlotFocus = { variable: string; platform?: string };
/** Opens the plots on a window, with `focus` in view. */
export type JumpTo = (from: string, to: string, focus?: PlotFocus) => void;

/**
 * The QC report of a version: counts per test × variable from the QC run, flag totals per variable, a timeline
 * of the worst flag per hour (or coarser) and the worst stretches, each with a jump into the plots.
 */
export function QcReportView({ versionId, onJump }: { versionId: string; onJump: JumpTo }) {
  const q = useQcReport(versionId);
  if (q.isPending) return <Loading label="Loading the QC report…" />;
  if (q.error) return <Alert tone="attention" title="The QC report could not be loaded">{getErrorMessage(q.error)}</Alert>;
  const r = q.data;
  const label = Object.fromEntries(r.variables.map((v) => [v.key, v]));
  const tested = Object.keys(r.testCounts);
  const tests = r.tests.filter((t) => tested.some((v) => r.testCounts[v]?.[t]));
  return (
    <div className="space-y-8" data-testid="qc-report">
      <section className="space-y-2">
        <h3 className="text-lg font-semibold">Flags per variable</h3>
        <p className="text-sm text-muted">
          Values per flag in this version{r.manualFlags ? `, including ${r.manualFlags} manual flag annotation${r.manualFlags === 1 ? "" : "s"}` : ""}. Derived values take the worst flag of their inputs.
        </p>
        <FlagCountsTable
          caption="Values per QC flag and variable"
          flags={FLAGS}
          rows={r.variables.map((v) => ({
            key: v.key,
            cells: [
              <>
                {v.label} <span className="text-sm text-muted">({v.unit})</span>
                {v.derived ? <span className="ml-1 text-xs text-muted">derived</span> : null}
              </>,
            ],
            counts: v.flags,
          }))}
        />
      </section>

      <section className="space-y-2">
        <h3 className="text-lg font-semibold">Raised by each test</h3>
        {tests.length === 0 ? (
          <EmptyState title="No test raised a flag">Every tested value passed. The flag counts above show what was evaluated.</EmptyState>
        ) : (
          <Table caption="Suspect and failed values per test and variable">
            <thead>
              <tr>
                <Th>Variable</Th>
                {tests.map((t) => (
                  <Th key={t} numeric>
                    {testWord(t)}
                  </Th>
                ))}
              </tr>
            </thead>
            <tbody>
              {tested.map((v) => (
                <Tr key={v}>
                  <Td>{label[v]?.label ?? v}</Td>
                  {tests.map((t) => {
                    const c = r.testCounts[v]?.[t];
                    return (
                      <Td key={t} numeric>
                        {c ? (
                          <span title={`${c[0]} suspect, ${c[1]} fail`}>
                            {c[0].toLocaleString("en")} <span className="text-xs text-muted">susp.</span> / {c[1].toLocaleString("en")} <span className="text-xs text-muted">fail</span>
                          </span>
                        ) : (
                          <span className="text-muted">—</span>
                        )}
                      </Td>
                    );
                  })}
                </Tr>
              ))}
            </tbody>
          </Table>
        )}
      </section>

      {r.timeline ? <Timeline report={r} labels={label} onJump={onJump} /> : null}

      <section className="space-y-2">
        <h3 className="text-lg font-semibold">Worst stretches</h3>
        {r.stretches.length === 0 ? (
          <EmptyState title="No flagged stretches">No minute of this version holds a suspect or failed value.</EmptyState>
        ) : (
          <Table caption="Stretches with suspect or failed values, worst first">
            <thead>
              <tr>
                <Th>Variable</Th>
                <Th>From (UTC)</Th>
                <Th>To (UTC)</Th>
                <Th>Worst flag</Th>
                <Th numeric unit="min">
                  Flagged
                </Th>
                <Th>
                  <span className="sr-only">Open</span>
                </Th>
              </tr>
            </thead>
            <tbody>
              {r.stretches.map((s) => (
                <Tr key={`${s.variable}-${s.platform}-${s.from}`}>
                  <Td>
                    {label[s.variable]?.label ?? s.variable}
                    {s.platform ? <span className="ml-1 text-sm text-muted">{s.platform}</span> : null}
                  </Td>
                  <Td className="num">{formatUtc(s.from)}</Td>
                  <Td className="num">{formatUtc(s.to)}</Td>
                  <Td>
                    <FlagBadge flag={s.worstFlag as QcFlag} />
                  </Td>
                  <Td numeric>{s.flaggedMinutes}</Td>
                  <Td>
                    <Button size="sm" variant="ghost" onClick={() => jumpAround(s.from, s.to, onJump, { variable: s.variable, platform: s.platform || undefined })}>
                      Show in plots
                    </Button>
                  </Td>
                </Tr>
              ))}
            </tbody>
          </Table>
        )}
      </section>
    </div>
  );
}

/** Opens the plots on a stretch with some context on both sides, the variable's plot in view. */
function jumpAround(from: string, to: string, onJump: JumpTo, focus?: PlotFocus) {
  const w = aroundStretch(from, to);
  onJump(w.from, w.to, focus);
}

function Timeline({ report, labels, onJump }: { report: QcReport; labels: Record<string, { label: string }>; onJump: JumpTo }) {
  const t = report.timeline!;
  const W = 900;
  const LEFT = 0;
  const rowH = 14;
  const cw = (W - LEFT) / t.length;
  const H = t.rows.length * (rowH + 4);
  const iso = (s: number) => new Date(s * 1000).toISOString();
  return (
    <section className="space-y-2">
      <h3 className="text-lg font-semibold">Timeline of flags</h3>
      <p className="text-sm text-muted">
        Worst flag per {t.stepS >= 86400 ? `${t.stepS / 86400} d` : `${t.stepS / 3600} h`} for each variable, {formatUtc(iso(t.t0))} to {formatUtc(iso(t.t0 + t.length * t.stepS))}. Select a
        cell to open the plots there.
      </p>
      <div className="grid grid-cols-[12rem_1fr] gap-x-2 rounded-lg border border-line bg-surface p-3" data-testid="qc-timeline">
        <div>
          {t.rows.map((r) => (
            <div key={r.variable} className="truncate text-xs leading-[18px]" title={labels[r.variable]?.label ?? r.variable}>
              {labels[r.variable]?.label ?? r.variable}
            </div>
          ))}
        </div>
        <svg viewBox={`0 0 ${W} ${H}`} preserveAspectRatio="none" className="h-auto w-full" style={{ height: H }} role="img" aria-label="Worst QC flag over time per variable">
          <Patterns />
          {t.rows.map((r, k) =>
            r.worstFlag.map((f, i) =>
              f === 9 ? null : (
                <rect
                  key={`${k}-${i}`}
                  x={LEFT + i * cw}
                  y={k * (rowH + 4)}
                  width={Math.max(cw, 1)}
                  height={rowH}
                  fill={fillOf(f)}
                  fillOpacity={opacityOf(f)}
                  className={f >= 3 ? "cursor-pointer" : undefined}
                  onClick={() => jumpAround(iso(t.t0 + i * t.stepS), iso(t.t0 + (i + 1) * t.stepS), onJump, { variable: r.variable })}
                >
                  <title>{`${labels[r.variable]?.label ?? r.variable}, ${formatUtc(iso(t.t0 + i * t.stepS))}: worst flag ${f}`}</title>
                </rect>
              ),
            ),
          )}
        </svg>
      </div>
      <ul className="flex flex-wrap gap-4 text-sm text-muted" aria-label="Timeline legend">
        {([1, 2, 3, 4] as QcFlag[]).map((f) => (
          <li key={f} className="inline-flex items-center gap-1.5">
            <Swatch flag={f} /> <FlagBadge flag={f} />
          </li>
        ))}
        <li className="inline-flex items-center gap-1.5">blank: no data</li>
      </ul>
    </section>
  );
}
