import { useMemo } from "react";
import type { PlotSeries } from "@shared/schemas/explore";

const W = 900;
const H = 120;
const LEFT = 64;
const RIGHT = 12;
const MID = 58;

/**
 * A stick (vector) plot: one stick per time step from the axis toward where the air or water moves (north up),
 * drawn from the bucket means of the eastward and northward components, thinned to at most ~110 sticks.
 */
export function StickPlot({ title, unit, noun, u, v, from, to }: { title: string; unit: string; noun: string; u: PlotSeries | undefined; v: PlotSeries | undefined; from: number; to: number }) {
  const sticks = useMemo(() => {
    if (!u || !v) return [];
    const vByT = new Map(v.t.map((t, i) => [t, v.mean[i]!]));
    const pairs: [number, number, number][] = [];
    u.t.forEach((t, i) => {
      const vv = vByT.get(t);
      if (vv !== undefined && Number.isFinite(u.mean[i]!) && Number.isFinite(vv)) pairs.push([t, u.mean[i]!, vv]);
    });
    const every = Math.max(1, Math.ceil(pairs.length / 110));
    return pairs.filter((_, i) => i % every === 0);
  }, [u, v]);
  const maxMag = Math.max(1e-9, ...sticks.map(([, a, b]) => Math.hypot(a, b)));
  const scale = 48 / maxMag;
  const x = (t: number) => LEFT + ((t - from) / (to - from || 1)) * (W - LEFT - RIGHT);
  const ticks = useMemo(() => {
    const n = 5;
    return Array.from({ length: n + 1 }, (_, i) => from + ((to - from) * i) / n);
  }, [from, to]);
  if (!sticks.length) return null;
  const refLen = niceRef(maxMag);
  return (
    <figure className="rounded-lg border border-line bg-surface p-3" data-testid="stick-plot">
      <h3 className="mb-1 font-semibold">
        {title} <span className="text-sm font-normal text-muted">({unit})</span>
      </h3>
      <svg viewBox={`0 0 ${W} ${H + 26}`} className="w-full" role="img" aria-label={`${title}: sticks point where the ${noun} moves toward, north up`}>
        <line x1={LEFT} x2={W - RIGHT} y1={MID} y2={MID} stroke="var(--t-border)" />
        {sticks.map(([t, a, b]) => (
          <line key={t} x1={x(t)} y1={MID} x2={x(t) + a * scale} y2={MID - b * scale} stroke="var(--t-accent)" strokeWidth={1.3} strokeLinecap="round" />
        ))}
        {ticks.map((t, i) => (
          <text key={t} x={x(t)} y={H + 18} fontSize={12} textAnchor={i === 0 ? "start" : i === ticks.length - 1 ? "end" : "middle"} fill="var(--t-muted)">
            {new Date(t * 1000).toISOString().slice(5, 16).replace("T", " ")}
          </text>
        ))}
        <g transform={`translate(8, ${MID})`}>
          <line x1={0} y1={0} x2={refLen * scale} y2={0} stroke="var(--t-fg)" strokeWidth={2} />
          <text x={0} y={16} fontSize={11} fill="var(--t-muted)">
            {refLen} {unit}
          </text>
        </g>
      </svg>
      <figcaption className="text-sm text-muted">Each stick points where the {noun} moves toward; north is up. Times in UTC. Scale bar at the left.</figcaption>
    </figure>
  );
}

function niceRef(max: number) {
  const p = 10 ** Math.floor(Math.log10(max));
  const m = max / p;
  return (m >= 5 ? 5 : m >= 2 ? 2 : 1) * p;
}
