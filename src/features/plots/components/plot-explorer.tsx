import { useEffect, useMemo, useRef, useState } from "react";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { EmptyState } from "@/components/ui/empty-state";
import { FlagBadge } from "@/components/ui/flag-badge";
import { Loading } from "@/components/ui/loading";
import { formatUtc } from "@/lib/format";
import { getErrorMessage } from "@/lib/api-client";
import { usePlotWindow } from "../api/get-plot-window";
import { panelsFor, stickDefs } from "./panels";
import { PlotPanel, type Shade } from "./plot-panel";
import { StickPlot } from "./stick-plot";

export type DragMode = "zoom" | "mark";

const iso = (s: number) => new Date(s * 1000).toISOString().replace(".000Z", "Z");

/**
 * The synchronised plot panels of one version for a time window. Zooming (drag, or the buttons) changes the window
 * and fetches finer buckets from the server; marking a range hands it to the caller (to annotate or flag it).
 */
export function PlotExplorer({
  versionId,
  variables,
  kind,
  window,
  onWindow,
  mode,
  onModeChange,
  hideFlagged,
  onHideFlaggedChange,
  onMark,
  shades,
  onShowNumbers,
  canMark,
  platforms,
  focus,
}: {
  versionId: string;
  variables: string[];
  kind: "mooring" | "drifter";
  window: { from: string | null; to: string | null };
  onWindow: (from: string | null, to: string | null) => void;
  mode: DragMode;
  onModeChange: (m: DragMode) => void;
  hideFlagged: boolean;
  onHideFlaggedChange: (v: boolean) => void;
  onMark: (from: string, to: string) => void;
  shades: Shade[];
  onShowNumbers: (from: string, to: string) => void;
  canMark: boolean;
  /** A fleet's platforms: one is plotted at a time. */
  platforms: string[];
  /** A variable (and a fleet's platform) to bring into view once the plots are drawn, e.g. from a flagged stretch. */
  focus?: { variable: string | null; platform: string | null };
}) {
  const [platform, setPlatform] = useState<string | null>(
    platforms.length > 1 ? (focus?.platform && platforms.includes(focus.platform) ? focus.platform : platforms[0]!) : null,
  );
  const panels = useMemo(() => panelsFor(variables, kind), [variables, kind]);
  const sticks = stickDefs.filter((s) => variables.includes(s.u) && variables.includes(s.v));
  const wanted = useMemo(() => [...new Set([...panels.flatMap((p) => p.variables.map((v) => v.key)), ...sticks.flatMap((s) => [s.u, s.v])])].slice(0, 24), [panels, sticks]);
  const q = usePlotWindow(versionId, wanted, window.from, window.to, 2000, platform);
  const focusPanel = focus?.variable ? panels.find((p) => p.variables.some((x) => x.key === focus.variable))?.id : undefined;
  const focused = useRef(false);
  useEffect(() => {
    if (!focusPanel || focused.current || !q.data) return;
    focused.current = true;
    document.getElementById(`plot-${focusPanel}`)?.scrollIntoView({ block: "start" });
  }, [focusPanel, q.data]);

  if (!panels.length) return <EmptyState title="Nothing to plot">This version has no variables Tauline plots. Check the column map of its upload.</EmptyState>;
  if (q.isPending) return <Loading label="Loading plots…" />;
  if (q.error) return <Alert tone="attention" title="The plots could not be loaded">{getErrorMessage(q.error)}</Alert>;
  const w = q.data;
  const from = Date.parse(window.from ?? w.extent.start ?? w.from) / 1000;
  const to = Date.parse(window.to ?? w.extent.end ?? w.to) / 1000 + (window.to ? 0 : 1);
  const start = Date.parse(w.extent.start ?? w.from) / 1000;
  const end = Date.parse(w.extent.end ?? w.to) / 1000 + 1;
  const span = to - from;
  const clamp = (a: number, b: number) => {
    const len = Math.min(b - a, end - start);
    let lo = Math.max(start, a);
    if (lo + len > end) lo = end - len;
    return [lo, lo + len] as const;
  };
  const go = (a: number, b: number) => {
    const [lo, hi] = clamp(a, b);
    if (lo <= start && hi >= end) onWindow(null, null);
    else onWindow(iso(lo), iso(hi));
  };
  const onSelect = (a: number, b: number) => {
    if (mode === "mark") onMark(iso(Math.floor(a)), iso(Math.ceil(b)));
    else if (b - a >= 10) go(a, b);
  };

  const csv = () => {
    const lines = ["variable,platform,bucket_start_utc,bucket_seconds,min,max,mean,count,worst_flag"];
    for (const s of w.series) s.t.forEach((t, i) => lines.push([s.variable, s.platform, iso(t), w.stepS, s.min[i], s.max[i], s.mean[i], s.n[i], s.worstFlag[i]].join(",")));
    const blob = new Blob([lines.join("\n") + "\n"], { type: "text/csv" });
    const a = document.createElement("a");
    a.href = URL.createObjectURL(blob);
    a.download = `tauline-plot-window-${iso(from).slice(0, 16).replace(/[:]/g, "")}.csv`;
    a.click();
    URL.revokeObjectURL(a.href);
  };

  return (
    <div className="space-y-3" data-testid="plot-explorer">
      <div className="flex flex-wrap items-center gap-2 rounded-lg border border-line bg-surface px-3 py-2 text-sm">
        <fieldset className="flex items-center gap-3">
          <legend className="sr-only">What dragging across a plot does</legend>
          <label className="inline-flex items-center gap-1">
            <input type="radio" name="drag-mode" checked={mode === "zoom"} onChange={() => onModeChange("zoom")} /> Drag to zoom
          </label>
          {canMark ? (
            <label className="inline-flex items-center gap-1">
              <input type="radio" name="drag-mode" checked={mode === "mark"} onChange={() => onModeChange("mark")} data-testid="mode-mark" /> Drag to mark a stretch
            </label>
          ) : null}
        </fieldset>
        <span className="mx-1 h-5 w-px bg-line" aria-hidden />
        <Button size="sm" variant="secondary" onClick={() => go(from + span / 4, to - span / 4)} aria-label="Zoom in on the middle half">
          Zoom in
        </Button>
        <Button size="sm" variant="secondary" onClick={() => go(from - span / 2, to + span / 2)}>
          Zoom out
        </Button>
        <Button size="sm" variant="secondary" onClick={() => go(from - span / 2, to - span / 2)} aria-label="Move half a window earlier">
          ◀ Earlier
        </Button>
        <Button size="sm" variant="secondary" onClick={() => go(from + span / 2, to + span / 2)} aria-label="Move half a window later">
          Later ▶
        </Button>
        <Button size="sm" variant="ghost" onClick={() => onWindow(null, null)}>
          Whole version
        </Button>
        {platform !== null ? (
          <label className="inline-flex items-center gap-1">
            Drifter
            <select className="rounded-md border border-field bg-surface px-1.5 py-0.5" value={platform} onChange={(e) => setPlatform(e.target.value)}>
              {platforms.map((p) => (
                <option key={p} value={p}>
                  {p}
                </option>
              ))}
            </select>
          </label>
        ) : null}
        <span className="mx-1 h-5 w-px bg-line" aria-hidden />
        <label className="inline-flex items-center gap-1">
          <input type="checkbox" checked={hideFlagged} onChange={(e) => onHideFlaggedChange(e.target.checked)} data-testid="hide-flagged" /> Hide suspect and failed
        </label>
        <span className="ml-auto flex gap-2">
          <Button size="sm" variant="secondary" onClick={() => onShowNumbers(iso(from), iso(to))} data-testid="show-numbers">
            Numbers for this window
          </Button>
          <Button size="sm" variant="secondary" onClick={csv}>
            CSV of this window
          </Button>
        </span>
      </div>
      <div className="flex flex-wrap items-center gap-x-4 gap-y-1 text-sm text-muted">
        <span className="num">
          {formatUtc(iso(from))} – {formatUtc(iso(to))}
        </span>
        <span>
          {w.source === "records" ? "from every record" : "pre-aggregated"}, buckets of <span className="num">{formatSpan(w.stepS)}</span>: line = mean, band = min to max
          {q.isFetching ? " · loading finer data…" : ""}
        </span>
        <span className="inline-flex items-center gap-1">
          marks above a bucket: <FlagBadge flag={3} /> <FlagBadge flag={4} /> (at least one value so flagged)
        </span>
        {hideFlagged ? <span>Buckets holding a suspect or failed value are hidden.</span> : null}
      </div>
      {panels.map((p) => (
        <div key={p.id} id={`plot-${p.id}`} data-variables={p.variables.map((x) => x.key).join(" ")} className="scroll-mt-4">
          <PlotPanel panel={p} series={w.series} from={from} to={to} stepS={w.stepS} hideFlagged={hideFlagged} shades={shades} onSelect={onSelect} syncKey={`explore-${versionId}`} />
        </div>
      ))}
      {sticks.map((s) => (
        <StickPlot
          key={s.id}
          title={s.title}
          unit={s.unit}
          noun={s.noun}
          u={w.series.find((x) => x.variable === s.u)}
          v={w.series.find((x) => x.variable === s.v)}
          from={from}
          to={to}
        />
      ))}
    </div>
  );
}

function formatSpan(s: number) {
  if (s < 120) return `${s} s`;
  if (s < 7200) return `${Math.round(s / 60)} min`;
  return `${(s / 3600).toFixed(s % 3600 ? 1 : 0)} h`;
}
