import type { ColumnMapInput } from "../schemas/column-map";

/**
 * Invented, physically plausible demo data, generated from a seed. Nothing here describes a real station,
 * organisation or dataset. Pure: the same options give the same numbers.
 */

/** Small seeded PRNG (mulberry32) returning numbers in [0, 1). */
export function seededRandom(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal deviates from a uniform source (Box–Muller). */
function gaussian(rand: () => number): () => number {
  let spare = NaN;
  return () => {
    if (spare === spare) {
      const s = spare;
      spare = NaN;
      return s;
    }
    const u = rand() || 1e-12;
    const v = rand();
    const r = Math.sqrt(-2 * Math.log(u));
    spare = r * Math.sin(2 * Math.PI * v);
    return r * Math.cos(2 * Math.PI * v);
  };
}

export interface MooringOptions {
  seed: number;
  /** Epoch seconds of the first record. */
  start: number;
  durationS: number;
  intervalS: number;
  latitude: number;
  longitude: number;
}

/** Columns of one mooring chunk, in the units the demo CSV uses (see `demoMooringColumnMap`). */
export interface MooringColumns {
  n: number;
  time: Float64Array;
  wind_speed: Float64Array; // m s-1 at 4 m
  wind_from_direction: Float64Array; // degree
  gust: Float64Array; // m s-1
  air_temperature: Float64Array; // degC
  air_pressure: Float64Array; // hPa
  relative_humidity: Float64Array; // percent
  sea_surface_temperature: Float64Array; // degC
  current_east: Float64Array; // cm s-1
  current_north: Float64Array; // cm s-1
}

export const demoMooringDefaults: MooringOptions = {
  seed: 20261202,
  start: Date.UTC(2026, 9, 1) / 1000,
  durationS: 31 * 86400,
  intervalS: 600,
  latitude: 41.25,
  longitude: -27.5,
};

/**
 * Yields a mooring's series chunk by chunk: a diurnal wind cycle, a storm passing at 40 % of the record (pressure
 * dip, wind rising and veering), air temperature, humidity and SST cycles, and currents made of a steady drift,
 * an Ekman-like wind-driven part 45° to the right of the wind (north) and inertial oscillations excited by the
 * storm. Cost O(rows).
 */
export function* mooringChunks(opts: MooringOptions, rowsPerChunk = 50_000): Generator<MooringColumns> {
  const rand = seededRandom(opts.seed);
  const g = gaussian(rand);
  const total = Math.floor(opts.durationS / opts.intervalS);
  const f = 2 * 7.292115e-5 * Math.sin((opts.latitude * Math.PI) / 180);
  const storm = opts.start + 0.4 * opts.durationS;
  const stormWidth = 18 * 3600;
  const dt = opts.intervalS;
  // AR(1) noise keeps neighbouring samples correlated, as real turbulence does.
  const phi = Math.exp(-dt / 300);
  const sig = Math.sqrt(1 - phi * phi);
  let nw = 0, nd = 0, nc = 0;
  // Inertial oscillation state (m/s).
  let iu = 0.05, iv = 0;
  const rot = f * dt;
  const cr = Math.cos(rot), sr = Math.sin(rot);
  for (let s = 0; s < total; s += rowsPerChunk) {
    const n = Math.min(rowsPerChunk, total - s);
    const c: MooringColumns = {
      n,
      time: new Float64Array(n),
      wind_speed: new Float64Array(n),
      wind_from_direction: new Float64Array(n),
      gust: new Float64Array(n),
      air_temperature: new Float64Array(n),
      air_pressure: new Float64Array(n),
      relative_humidity: new Float64Array(n),
      sea_surface_temperature: new Float64Array(n),
      current_east: new Float64Array(n),
      current_north: new Float64Array(n),
    };
    for (let k = 0; k < n; k++) {
      const t = opts.start + (s + k) * dt;
      const day = ((t % 86400) / 86400) * 2 * Math.PI;
      const e = (t - storm) / stormWidth;
      const bump = Math.exp(-e * e);
      nw = phi * nw + sig * g();
      nd = phi * nd + sig * g();
      nc = phi * nc + sig * g();
      const speed = Math.max(0.2, 6.5 + 1.2 * Math.sin(day - 2) + 13 * bump + 0.6 * nw);
      // The wind veers from south-west to north-west as the storm passes.
      const dir = (((225 + 60 * Math.tanh(e) + 12 * nd) % 360) + 360) % 360;
      const rad = (dir * Math.PI) / 180;
      const wu = -speed * Math.sin(rad);
      const wv = -speed * Math.cos(rad);
      // Inertial oscillation: rotates clockwise (north) at f, kicked by the storm, slowly damped.
      const nu = cr * iu + sr * iv;
      const nv = -sr * iu + cr * iv;
      iu = nu * (1 - dt / (6 * 86400)) + 0.002 * bump * wu * (dt / 3600);
      iv = nv * (1 - dt / (6 * 86400)) + 0.002 * bump * wv * (dt / 3600);
      const ek = 0.012 * speed;
      const ekDir = rad + Math.PI + Math.PI / 4; // wind heading turned 45° clockwise
      const cu = 0.04 + ek * Math.sin(ekDir) + iu + 0.01 * nc;
      const cv = 0.02 + ek * Math.cos(ekDir) + iv + 0.01 * g();
      c.time[k] = t;
      c.wind_speed[k] = speed;
      c.wind_from_direction[k] = dir;
      c.gust[k] = speed * (1.25 + 0.1 * rand());
      c.air_temperature[k] = 15.5 + 1.8 * Math.sin(day - 2.2) - 3 * bump * (e > 0 ? 1 : 0.3) + 0.1 * g();
      c.air_pressure[k] = 1016 - 26 * bump + 0.8 * Math.sin(2 * day) + 0.05 * g();
      c.relative_humidity[k] = Math.min(100, 78 - 8 * Math.sin(day - 2.2) + 12 * bump + 1.5 * g());
      c.sea_surface_temperature[k] = 17.2 + 0.3 * Math.sin(day - 2.6) - 0.6 * bump + 0.02 * g();
      c.current_east[k] = cu * 100;
      c.current_north[k] = cv * 100;
    }
    yield c;
  }
}

/** The whole mooring series as one set of columns (joins `mooringChunks`). Cost O(rows). */
export function generateMooring(opts: MooringOptions): MooringColumns {
  const parts = [...mooringChunks(opts)];
  const n = parts.reduce((s, c) => s + c.n, 0);
  const keys = ["time", "wind_speed", "wind_from_direction", "gust", "air_temperature", "air_pressure", "relative_humidity", "sea_surface_temperature", "current_east", "current_north"] as const;
  const out = { n } as MooringColumns;
  for (const k of keys) {
    const a = new Float64Array(n);
    let o = 0;
    for (const c of parts) {
      a.set(c[k], o);
      o += c.n;
    }
    out[k] = a;
  }
  return out;
}

function iso(t: number): string {
  return new Date(t * 1000).toISOString().replace(".000Z", "Z");
}

/** Header of the demo mooring CSV; matches `demoMooringColumnMap`. */
export const demoMooringHeader = "time,wspd,wdir,gust,airt,baro,rh,sst,cur_e,cur_n";

/**
 * The demo mooring as CSV text, yielded in pieces (header first). Units: m/s, degrees from, °C, hPa, %, cm/s.
 * Cost O(rows).
 */
export function* mooringCsv(opts: MooringOptions, rowsPerChunk = 50_000): Generator<string> {
  yield demoMooringHeader + "\n";
  for (const c of mooringChunks(opts, rowsPerChunk)) {
    const lines: string[] = new Array(c.n);
    for (let k = 0; k < c.n; k++) {
      lines[k] =
        `${iso(c.time[k]!)},${c.wind_speed[k]!.toFixed(2)},${c.wind_from_direction[k]!.toFixed(1)},${c.gust[k]!.toFixed(2)},` +
        `${c.air_temperature[k]!.toFixed(2)},${c.air_pressure[k]!.toFixed(2)},${c.relative_humidity[k]!.toFixed(1)},` +
        `${c.sea_surface_temperature[k]!.toFixed(3)},${c.current_east[k]!.toFixed(2)},${c.current_north[k]!.toFixed(2)}`;
    }
    yield lines.join("\n") + "\n";
  }
}

/** Column map for the demo mooring CSV. */
export function demoMooringColumnMap(): ColumnMapInput {
  return {
    version: 1,
    delimiter: ",",
    headerRow: 1,
    time: { columns: ["time"], format: "iso8601", zone: null },
    columns: [
      { column: "wspd", variable: "wind_speed", unit: "m s-1" },
      { column: "wdir", variable: "wind_from_direction", unit: "degree", convention: "from" },
      { column: "gust", variable: "wind_speed_of_gust", unit: "m s-1" },
      { column: "airt", variable: "air_temperature", unit: "degC" },
      { column: "baro", variable: "air_pressure", unit: "hPa" },
      { column: "rh", variable: "relative_humidity", unit: "percent" },
      { column: "sst", variable: "sea_surface_temperature", unit: "degC" },
      { column: "cur_e", variable: "eastward_sea_water_velocity", unit: "cm s-1" },
      { column: "cur_n", variable: "northward_sea_water_velocity", unit: "cm s-1" },
    ],
  };
}

export interface FleetOptions {
  seed: number;
  count: number;
  start: number;
  durationS: number;
  intervalS: number;
  latitude: number;
  longitude: number;
}

export const demoFleetDefaults: FleetOptions = {
  seed: 7,
  count: 5,
  start: Date.UTC(2026, 9, 1) / 1000,
  durationS: 20 * 86400,
  intervalS: 3600,
  latitude: 33.5,
  longitude: -38,
};

export interface FleetTracks {
  /** Invented drifter ids, e.g. "TD-01". */
  ids: string[];
  time: Float64Array;
  platform: Int32Array;
  latitude: Float64Array;
  longitude: Float64Array;
}

/**
 * Tracks of several drifters released close together: a shared gyre-like drift (~0.15 m/s), inertial loops and
 * a random walk each, sampled every `intervalS`, records interleaved by time. Cost O(count × steps).
 */
export function generateFleet(opts: FleetOptions): FleetTracks {
  const rand = seededRandom(opts.seed);
  const g = gaussian(rand);
  const steps = Math.floor(opts.durationS / opts.intervalS) + 1;
  const m = steps * opts.count;
  const out: FleetTracks = {
    ids: Array.from({ length: opts.count }, (_, i) => `TD-${String(i + 1).padStart(2, "0")}`),
    time: new Float64Array(m),
    platform: new Int32Array(m),
    latitude: new Float64Array(m),
    longitude: new Float64Array(m),
  };
  const lat = Array.from({ length: opts.count }, () => opts.latitude + 0.3 * (rand() - 0.5));
  const lon = Array.from({ length: opts.count }, () => opts.longitude + 0.3 * (rand() - 0.5));
  const f = 2 * 7.292115e-5 * Math.sin((opts.latitude * Math.PI) / 180);
  const phase = Array.from({ length: opts.count }, () => rand() * 2 * Math.PI);
  const ru = new Array(opts.count).fill(0);
  const rv = new Array(opts.count).fill(0);
  let j = 0;
  for (let s = 0; s < steps; s++) {
    const t = opts.start + s * opts.intervalS;
    for (let p = 0; p < opts.count; p++) {
      out.time[j] = t;
      out.platform[j] = p;
      out.latitude[j] = lat[p]!;
      out.longitude[j] = lon[p]!;
      j++;
      ru[p] = 0.9 * ru[p] + 0.03 * g();
      rv[p] = 0.9 * rv[p] + 0.03 * g();
      const ang = f * (t - opts.start) + phase[p]!;
      const u = 0.12 + 0.08 * Math.cos(ang) + ru[p];
      const v = 0.05 - 0.08 * Math.sin(ang) + rv[p];
      lat[p] = lat[p]! + ((v * opts.intervalS) / 6_371_000) * (180 / Math.PI);
      lon[p] = lon[p]! + ((u * opts.intervalS) / (6_371_000 * Math.cos((lat[p]! * Math.PI) / 180))) * (180 / Math.PI);
    }
  }
  return out;
}

/** The fleet as CSV text in pieces: `time,id,lat,lon`. Cost O(records). */
export function* fleetCsv(opts: FleetOptions, rowsPerChunk = 10_000): Generator<string> {
  const tr = generateFleet(opts);
  yield "time,id,lat,lon\n";
  for (let s = 0; s < tr.time.length; s += rowsPerChunk) {
    const e = Math.min(tr.time.length, s + rowsPerChunk);
    let out = "";
    for (let k = s; k < e; k++) out += `${iso(tr.time[k]!)},${tr.ids[tr.platform[k]!]},${tr.latitude[k]!.toFixed(5)},${tr.longitude[k]!.toFixed(5)}\n`;
    yield out;
  }
}

/** Column map for the demo fleet CSV. */
export function demoFleetColumnMap(): ColumnMapInput {
  return {
    version: 1,
    time: { columns: ["time"], format: "iso8601", zone: null },
    platformColumn: "id",
    columns: [
      { column: "lat", variable: "latitude", unit: "degree_north" },
      { column: "lon", variable: "longitude", unit: "degree_east" },
    ],
  };
}
