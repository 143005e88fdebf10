/**
 * Bench part "plot" (issue 7): GET /api/versions/:id/plot over HTTP for 2,000-bucket windows of a version holding the
 * month-at-1-Hz demo mooring (~2.7 million rows), at several zoom levels (whole month → ten minutes), repeated at
 * random positions. The version is built once through the pipeline's own `buildVersion` (same code the worker runs)
 * into its own database on the bench cluster (.bench/pg) and reused by later runs while it is still there.
 * Figures: rows, p50_ms and p95_ms over all calls (goal p95 < 100), plus p95 per zoom level.
 */
import type { AddressInfo } from "node:net";
import { performance } from "node:perf_hooks";
import { seededRandom } from "../../shared/demo/generate";
import { adminCookie, monthVersion } from "./lib/month-version";
import type { BenchContext } from "./run";

const ZOOMS: [string, number][] = [
  ["month", 31 * 86400],
  ["week", 7 * 86400],
  ["day", 86400],
  ["6h", 6 * 3600],
  ["1h", 3600],
  ["10min", 600],
];
const CALLS_PER_ZOOM = 30;
const VARIABLES = "wind_speed,magnitude_of_surface_downward_stress";

const pct = (xs: number[], p: number) => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.ceil((p / 100) * s.length) - 1)]!;
};

export async function run(ctx: BenchContext) {
  await ctx.mooringCsv();
  const { version, pool } = await monthVersion(ctx.dir);
  const o = ctx.mooringOptions;

  // The real HTTP app, and an admin session (admins read every version).
  const { createApp } = await import("../../server/app");
  const server = createApp({ serveClient: false }).listen(0, "127.0.0.1");
  await new Promise((r) => server.once("listening", r));
  const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const cookie = await adminCookie(base, pool);

  const rand = seededRandom(7);
  const start = o.start;
  const end = o.start + o.durationS;
  const get = async (from: number, to: number) => {
    const t = performance.now();
    const res = await fetch(`${base}/api/versions/${version.id}/plot?variables=${VARIABLES}&buckets=2000&from=${new Date(from * 1000).toISOString()}&to=${new Date(to * 1000).toISOString()}`, {
      headers: { cookie },
    });
    const body = (await res.json()) as { series?: { t: number[] }[]; source?: string };
    const ms = performance.now() - t;
    if (!res.ok || !body.series?.length) throw new Error(`plot bench: ${res.status} ${JSON.stringify(body).slice(0, 300)}`);
    return { ms, source: body.source!, points: body.series[0]!.t.length };
  };
  await get(start, end); // warm-up: connections, plans
  const all: number[] = [];
  const figures: Record<string, number | string> = {};
  for (const [name, span] of ZOOMS) {
    const times: number[] = [];
    let source = "";
    let points = 0;
    for (let k = 0; k < CALLS_PER_ZOOM; k++) {
      const from = span >= end - start ? start : start + Math.floor(rand() * (end - start - span));
      const r = await get(from, from + span);
      times.push(r.ms);
      source = r.source;
      points = r.points;
    }
    all.push(...times);
    figures[`p95_ms_${name}`] = Number(pct(times, 95).toFixed(1));
    ctx.log(`plot: ${name}: p50 ${pct(times, 50).toFixed(1)} ms, p95 ${pct(times, 95).toFixed(1)} ms (${source}, ${points} buckets)`);
  }
  server.close();
  await pool.end();
  return { rows: version.rows, p50_ms: Number(pct(all, 50).toFixed(1)), p95_ms: Number(pct(all, 95).toFixed(1)), calls: all.length, ...figures };
}
