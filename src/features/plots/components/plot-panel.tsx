import { useEffect, useMemo, useRef, useState } from "react";
import uPlot from "uplot";
import "uplot/dist/uPlot.min.css";
import type { PlotSeries } from "@shared/schemas/explore";
import { formatUtc } from "@/lib/format";
import type { PanelDef } from "./panels";

/** A time range shaded on the plot (annotations, and the range being annotated). */
export interface Shade {
  from: number;
  to: number;
  label: string;
  pending?: boolean;
}

const SERIES_STYLE = [
  { colour: "--t-accent", dash: [] as number[] },
  { colour: "--t-flag-missing", dash: [7, 4] },
  { colour: "--t-field", dash: [2, 3] },
  { colour: "--t-ok", dash: [10, 3, 2, 3] },
];

const css = (name: string) => getComputedStyle(document.documentElement).getPropertyValue(name).trim() || "#444";

function dashSample(dash: number[]) {
  return (
    <svg aria-hidden viewBox="0 0 28 6" className="h-1.5 w-7">
      <line x1="0" y1="3" x2="28" y2="3" stroke="currentColor" strokeWidth="2.2" strokeDasharray={dash.join(" ")} />
    </svg>
  );
}

/**
 * One panel: for each variable a line through the bucket means and a band from bucket min to max (so spikes stay
 * visible at any zoom), glyphs where a bucket holds suspect (▲) or failed (✕) values, and shaded annotations.
 * Panels share a cursor (uPlot sync). Dragging across the plot reports the range to `onSelect`.
 */
export function PlotPanel({
  panel,
  series,
  from,
  to,
  stepS,
  hideFlagged,
  shades,
  onSelect,
  syncKey,
}: {
  panel: PanelDef;
  series: PlotSeries[];
  from: number;
  to: number;
  stepS: number;
  hideFlagged: boolean;
  shades: Shade[];
  onSelect: (from: number, to: number) => void;
  syncKey: string;
}) {
  const box = useRef<HTMLDivElement>(null);
  const plot = useRef<uPlot | null>(null);
  const [cursorIdx, setCursorIdx] = useState<number | null>(null);
  const onSelectRef = useRef(onSelect);
  onSelectRef.current = onSelect;
  const shadesRef = useRef(shades);
  shadesRef.current = shades;

  // Align every variable on one time axis (bucket centres); null where a bucket is empty or hidden.
  const { data, flags } = useMemo(() => {
    const ts = new Set<number>();
    const bySeries = panel.variables.map((v) => series.find((s) => s.variable === v.key));
    for (const s of bySeries) for (const t of s?.t ?? []) ts.add(t);
    const xs = [...ts].sort((a, b) => a - b);
    const index = new Map(xs.map((t, i) => [t, i]));
    const cols: (number | null)[][] = [];
    const fl: (number | null)[][] = [];
    for (const s of bySeries) {
      const mean = new Array<number | null>(xs.length).fill(null);
      const min = new Array<number | null>(xs.length).fill(null);
      const max = new Array<number | null>(xs.length).fill(null);
      const f = new Array<number | null>(xs.length).fill(null);
      s?.t.forEach((t, k) => {
        const i = index.get(t)!;
        const wf = s.worstFlag[k]!;
        f[i] = wf;
        if (hideFlagged && (wf === 3 || wf === 4)) return;
        mean[i] = s.mean[k]!;
        min[i] = s.min[k]!;
        max[i] = s.max[k]!;
      });
      cols.push(mean, min, max);
      fl.push(f);
    }
    return { data: [xs.map((t) => t + stepS / 2), ...cols] as uPlot.AlignedData, flags: fl };
  }, [series, panel, hideFlagged, stepS]);
  const flagsRef = useRef(flags);
  flagsRef.current = flags;

  useEffect(() => {
    const el = box.current!;
    const nv = panel.variables.length;
    const seriesOpts: uPlot.Series[] = [{ label: "Time (UTC)" }];
    const bands: uPlot.Band[] = [];
    panel.variables.forEach((v, k) => {
      const st = SERIES_STYLE[k % SERIES_STYLE.length]!;
      const colour = css(st.colour);
      seriesOpts.push({ label: v.label, stroke: colour, width: 1.6, dash: st.dash, spanGaps: false, points: { show: false } });
      seriesOpts.push({ label: `${v.label} min`, stroke: "transparent", width: 0, points: { show: false } });
      seriesOpts.push({ label: `${v.label} max`, stroke: "transparent", width: 0, points: { show: false } });
      bands.push({ series: [3 + 3 * k, 2 + 3 * k], fill: `${colour}33` });
    });
    const fg = css("--t-muted");
    const grid = css("--t-border");
    const opts: uPlot.Options = {
      width: el.clientWidth || 800,
      height: 190,
      // Room on the right for the last time label, which uPlot centres on its tick.
      padding: [8, 40, 0, 0],
      legend: { show: false },
      tzDate: (ts) => uPlot.tzDate(new Date(ts * 1e3), "Etc/UTC"),
      cursor: { sync: { key: syncKey, setSeries: false }, drag: { x: true, y: false, setScale: false }, points: { show: false } },
      scales: { x: { time: true, range: () => [from, to] } },
      axes: [
        { stroke: fg, grid: { stroke: grid, width: 1 }, ticks: { stroke: grid }, label: "Time (UTC)", labelSize: 18, size: 44, space: 90, values: timeTicks },
        { stroke: fg, grid: { stroke: grid, width: 1 }, ticks: { stroke: grid }, label: panel.unit, labelSize: 18, size: 64 },
      ],
      series: seriesOpts,
      bands,
      hooks: {
        setSelect: [
          (u) => {
            if (u.select.width > 3) {
              const a = u.posToVal(u.select.left, "x");
              const b = u.posToVal(u.select.left + u.select.width, "x");
              onSelectRef.current(a, b);
            }
            u.setSelect({ left: 0, top: 0, width: 0, height: 0 }, false);
          },
        ],
        setCursor: [(u) => setCursorIdx(u.cursor.idx ?? null)],
        drawClear: [
          (u) => {
            const ctx = u.ctx;
            ctx.save();
            for (const s of shadesRef.current) {
              const x0 = Math.max(u.bbox.left, u.valToPos(s.from, "x", true));
              const x1 = Math.min(u.bbox.left + u.bbox.width, u.valToPos(s.to, "x", true));
              if (x1 <= x0 - 1) continue;
              ctx.fillStyle = s.pending ? `${css("--t-signal-fill")}40` : `${css("--t-flag-missing")}22`;
              ctx.fillRect(x0, u.bbox.top, Math.max(2, x1 - x0), u.bbox.height);
            }
            ctx.restore();
          },
        ],
        draw: [
          (u) => {
            // Flag glyphs above each bucket's max: a triangle for suspect, a cross for fail (shape, not only colour).
            const ctx = u.ctx;
            const dpr = devicePixelRatio || 1;
            ctx.save();
            for (let k = 0; k < nv; k++) {
              const f = flagsRef.current[k]!;
              const xs = u.data[0];
              const maxes = u.data[3 + 3 * k]!;
              const means = u.data[1 + 3 * k]!;
              for (let i = 0; i < xs.length; i++) {
                const fl = f[i];
                if (fl !== 3 && fl !== 4) continue;
                const yv = maxes[i] ?? means[i] ?? null;
                const x = u.valToPos(xs[i]!, "x", true);
                const y = yv === null ? u.bbox.top + 6 * dpr : u.valToPos(yv, "y", true) - 6 * dpr;
                if (x < u.bbox.left || x > u.bbox.left + u.bbox.width) continue;
                const r = 4 * dpr;
                if (fl === 3) {
                  ctx.fillStyle = css("--t-flag-suspect");
                  ctx.beginPath();
                  ctx.moveTo(x, y - r);
                  ctx.lineTo(x + r, y + r * 0.8);
                  ctx.lineTo(x - r, y + r * 0.8);
                  ctx.closePath();
                  ctx.fill();
                } else {
                  ctx.strokeStyle = css("--t-flag-fail");
                  ctx.lineWidth = 2 * dpr;
                  ctx.beginPath();
                  ctx.moveTo(x - r, y - r);
                  ctx.lineTo(x + r, y + r);
                  ctx.moveTo(x + r, y - r);
                  ctx.lineTo(x - r, y + r);
                  ctx.stroke();
                }
              }
            }
            ctx.restore();
          },
        ],
      },
    };
    const u = new uPlot(opts, data, el);
    plot.current = u;
    const ro = new ResizeObserver(() => u.setSize({ width: el.clientWidth, height: 190 }));
    ro.observe(el);
    return () => {
      ro.disconnect();
      u.destroy();
      plot.current = null;
    };
    // Re-create when the panel's shape, window or data change; uPlot is cheap to build at these sizes.
  }, [panel, data, from, to, syncKey]);

  useEffect(() => {
    plot.current?.redraw(false);
  }, [shades]);

  const at = cursorIdx !== null ? (data[0][cursorIdx] ?? null) : null;
  return (
    <div
      className="rounded-lg border border-line bg-surface p-3"
      data-testid={`plot-panel-${panel.id}`}
      data-suspect-buckets={flags[0]?.filter((f) => f === 3).length ?? 0}
      data-fail-buckets={flags[0]?.filter((f) => f === 4).length ?? 0}
      data-buckets={flags[0]?.filter((f) => f !== null).length ?? 0}
    >
      <div className="mb-1 flex flex-wrap items-baseline justify-between gap-2">
        <h3 className="font-semibold">
          {panel.title} <span className="text-sm font-normal text-muted">({panel.unit})</span>
        </h3>
        <span className="num text-xs text-muted" aria-live="off">
          {at !== null ? formatUtc(new Date((at - stepS / 2) * 1000).toISOString(), true) : "Point at the plot to read values"}
        </span>
      </div>
      <div ref={box} className="w-full" />
      <ul className="mt-1 flex flex-wrap gap-x-5 gap-y-1 text-sm" aria-label={`${panel.title} series`}>
        {panel.variables.map((v, k) => {
          const st = SERIES_STYLE[k % SERIES_STYLE.length]!;
          const i = cursorIdx;
          const mean = i !== null ? data[1 + 3 * k]![i] : null;
          const min = i !== null ? data[2 + 3 * k]![i] : null;
          const max = i !== null ? data[3 + 3 * k]![i] : null;
          return (
            <li key={v.key} className="inline-flex items-center gap-1.5" style={{ color: `var(${st.colour})` }}>
              {dashSample(st.dash)}
              <span className="text-fg">{v.label}</span>
              {mean !== null && mean !== undefined ? (
                <span className="num text-muted">
                  {fmt(mean)} <span className="text-xs">({fmt(min)} to {fmt(max)})</span>
                </span>
              ) : null}
            </li>
          );
        })}
      </ul>
    </div>
  );
}

/** ISO-style UTC tick labels: dates for long windows, hours and minutes (and seconds) for short ones. */
function timeTicks(_u: uPlot, splits: number[], _axis: number, _space: number, incr: number): string[] {
  return splits.map((t) => {
    const s = new Date(t * 1000).toISOString();
    if (incr >= 86400) return s.slice(0, 10);
    if (incr >= 60) return s.slice(11, 16) === "00:00" ? `${s.slice(5, 10)} 00:00` : s.slice(11, 16);
    return s.slice(11, 19);
  });
}

function fmt(x: number | null | undefined) {
  if (x === null || x === undefined || !Number.isFinite(x)) return "—";
  const a = Math.abs(x);
  const s = a !== 0 && (a < 0.01 || a >= 1e5) ? x.toExponential(2) : x.toFixed(a < 1 ? 4 : 2);
  return s.replace(/^-/, "−");
}
