import { columnMapSchema, type ColumnMap, type ColumnMapInput, type ColumnMapping } from "../schemas/column-map";
import { normalizeUnit } from "../units";
import { allowedUnits, isAllowedUnit, resolveVariable, vocabulary, type MeasuredVariable } from "../vocabulary";
import { isDataLike, type Dialect } from "./dialect";

/**
 * Suggests a column map for a file from its header names, units written in the headers, the values' ranges and the
 * platform's last saved map. A suggestion is a starting point for the editor, never applied unseen.
 */

/** Header words (lower case, punctuation removed) that name a variable. */
const keywords: [RegExp, MeasuredVariable][] = [
  [/^(wspd|ws|windspeed|wind ?speed|wind ?spd|wspeed|ff|wind)$/, "wind_speed"],
  [/^(wdir|wd|winddir|wind ?dir(ection)?|dd|wind ?from)$/, "wind_from_direction"],
  [/^(u ?wind|uwnd|wind ?u|u10|wind ?east(ward)?)$/, "eastward_wind"],
  [/^(v ?wind|vwnd|wind ?v|v10|wind ?north(ward)?)$/, "northward_wind"],
  [/^(gust|gst|wind ?gust|gust ?speed|wgust)$/, "wind_speed_of_gust"],
  [/^(airt|atmp|air ?temp(erature)?|ta|tair|at|temp ?air)$/, "air_temperature"],
  [/^(baro|pres|pressure|air ?press(ure)?|bp|patm)$/, "air_pressure"],
  [/^(slp|mslp|msl|sea ?level ?pressure)$/, "air_pressure_at_mean_sea_level"],
  [/^(rh|humidity|rel ?hum(idity)?|relative ?humidity)$/, "relative_humidity"],
  [/^(sst|wtmp|sea ?surface ?temp(erature)?|skin ?temp)$/, "sea_surface_temperature"],
  [/^(water ?temp(erature)?|temp ?water|tw|sea ?temp|wt)$/, "sea_water_temperature"],
  [/^(sal|psal|salinity|sss)$/, "sea_water_practical_salinity"],
  [/^(cur ?e|u ?cur|ucur|current ?u|current ?east(ward)?|east ?vel(ocity)?|ve|u)$/, "eastward_sea_water_velocity"],
  [/^(cur ?n|v ?cur|vcur|current ?v|current ?north(ward)?|north ?vel(ocity)?|vn|v)$/, "northward_sea_water_velocity"],
  [/^(cspd|cur ?spd|cur ?speed|current ?speed|csp)$/, "sea_water_speed"],
  [/^(cdir|cur ?dir|current ?dir(ection)?)$/, "sea_water_velocity_to_direction"],
  [/^(lat|latitude|lat ?deg)$/, "latitude"],
  [/^(lon|long|longitude|lon ?deg)$/, "longitude"],
];

const TIME_WORDS = /^(time|datetime|date ?time|timestamp|time ?utc|utc|date ?utc|t)$/;
const DATE_WORDS = /^(date|day|yyyy ?mm ?dd)$/;
const TIME_OF_DAY_WORDS = /^(time|hhmmss|hour|clock)$/;
const PLATFORM_WORDS = /^(id|platform|platform ?id|buoy|drifter|buoy ?id|drifter ?id|station)$/;

/** Splits "WSPD (m/s)", "wind_speed[kn]", "airt_degC" into a name and a unit spelling. */
export function parseHeader(h: string): { name: string; unit: string | null } {
  const t = h.trim();
  const m = /^(.*?)\s*[([{]\s*([^)\]}]+)\s*[)\]}]\s*$/.exec(t);
  if (m) return { name: m[1]!, unit: m[2]! };
  const s = /^(.*?)[_ ](m\/?s|ms|kn|kt|knots|degc|degf|deg|hpa|mbar|pct|percent|cms|cm\/?s|psu)$/i.exec(t);
  if (s) return { name: s[1]!, unit: ({ ms: "m/s", cms: "cm/s", pct: "%" } as Record<string, string>)[s[2]!.toLowerCase()] ?? s[2]! };
  return { name: t, unit: null };
}

const norm = (name: string) => name.toLowerCase().replace(/[_\-.:/]+/g, " ").replace(/\s+/g, " ").trim();

/** The variable a header name suggests, if any. Exact CF names (and Tauline's aliases) win. */
export function variableForHeader(header: string): MeasuredVariable | undefined {
  const { name } = parseHeader(header);
  const r = resolveVariable(name.trim());
  if (r) return r.canonical;
  const n = norm(name);
  for (const [rx, v] of keywords) if (rx.test(n)) return v;
  return undefined;
}

function median(xs: number[]): number {
  if (!xs.length) return NaN;
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)]!;
}

/** A unit for a column from its header, else from the values' typical size (documented guesses, shown to the user). */
export function unitFor(variable: MeasuredVariable, headerUnit: string | null, values: number[]): { unit: string; why: string } {
  if (headerUnit) {
    const u = normalizeUnit(headerUnit);
    if (isAllowedUnit(variable, u)) return { unit: allowedUnits(variable).find((a) => a === u) ?? u, why: `unit "${headerUnit}" in the header` };
  }
  const dim = vocabulary[variable].dimension;
  const mags = values.filter(Number.isFinite).map(Math.abs);
  const med = median(mags);
  const max = Math.max(0, ...mags);
  if (dim === "temperature" && Number.isFinite(med)) return med > 150 ? { unit: "K", why: "values near 273–310 read as kelvin" } : { unit: "degC", why: "values below 150 read as °C" };
  if (dim === "pressure" && Number.isFinite(med)) {
    if (med > 50_000) return { unit: "Pa", why: "values near 100 000 read as Pa" };
    if (med > 500) return { unit: "hPa", why: "values near 1 000 read as hPa" };
    return { unit: "kPa", why: "values near 100 read as kPa" };
  }
  if (dim === "fraction" && Number.isFinite(max)) return max > 1.5 ? { unit: "percent", why: "values above 1 read as percent" } : { unit: "1", why: "values up to 1 read as a fraction" };
  if (dim === "speed" && variable.includes("sea_water") && Number.isFinite(max) && max > 5) return { unit: "cm s-1", why: "current values above 5 read as cm/s" };
  return { unit: vocabulary[variable].canonicalUnit, why: "no unit in the header: the canonical unit is assumed" };
}

export interface Suggestion {
  map: ColumnMapInput;
  /** Where the map came from. */
  source: "platform" | "headers";
  /** One note per decision the user should check. */
  notes: string[];
}

/**
 * Suggests a map for a file with this header and these first data rows. When the platform's previous map names
 * only columns this header has, it is reused with the sniffed dialect. Cost O(columns × rows).
 */
export function suggestColumnMap(header: string[] | null, rows: string[][], dialect: Dialect, previous?: ColumnMap | null): Suggestion {
  const base = { version: 1 as const, delimiter: dialect.delimiter, decimalMark: dialect.decimalMark, headerRow: dialect.headerRow, skipRows: dialect.skipRows };
  if (previous && header) {
    const names = new Set(header);
    const refs = [...previous.time.columns, ...previous.columns.map((c) => c.column), ...(previous.platformColumn !== undefined ? [previous.platformColumn] : [])];
    if (refs.every((r) => (typeof r === "number" ? r <= header.length : names.has(r)))) {
      return { map: { ...previous, ...base }, source: "platform", notes: ["The platform's last saved map fits this file's header and was reused."] };
    }
  }
  const notes: string[] = [];
  const width = header?.length ?? rows[0]?.length ?? 0;
  const ref = (i: number): string | number => (header ? header[i]! : i + 1);
  const columnValues = (i: number) =>
    rows.map((r) => Number((r[i] ?? "").trim().replace(dialect.decimalMark === "," ? "," : "\u0000", "."))).filter(Number.isFinite);

  // Time: a header word, else the first column whose values read as ISO times.
  let timeCols: number[] = [];
  if (header) {
    const normed = header.map((h) => norm(parseHeader(h).name));
    const t = normed.findIndex((n) => TIME_WORDS.test(n));
    const d = normed.findIndex((n) => DATE_WORDS.test(n));
    const tod = normed.findIndex((n, i) => i !== d && TIME_OF_DAY_WORDS.test(n));
    if (d >= 0 && tod >= 0 && !/\d{4}-\d{2}-\d{2}[T ]/.test(rows[0]?.[tod] ?? "")) timeCols = [d, tod];
    else if (t >= 0) timeCols = [t];
  }
  if (!timeCols.length) {
    const i = Array.from({ length: width }, (_, k) => k).find((k) => /^\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}/.test((rows[0]?.[k] ?? "").trim()));
    if (i !== undefined) timeCols = [i];
  }
  const sampleTime = timeCols.length === 1 ? (rows[0]?.[timeCols[0]!] ?? "").trim() : `${(rows[0]?.[timeCols[0] ?? 0] ?? "").trim()} ${(rows[0]?.[timeCols[1] ?? 1] ?? "").trim()}`;
  let format = "iso8601";
  let zone: string | null = null;
  if (/^\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}/.test(sampleTime)) {
    if (!/(Z|[+-]\d{2}:?\d{2})$/.test(sampleTime)) {
      zone = "UTC";
      notes.push(`Times such as "${sampleTime}" carry no zone: UTC is assumed. Change the zone if the logger kept local time.`);
    }
  } else if (/^\d{1,2}\/\d{1,2}\/\d{4} \d{1,2}:\d{2}(:\d{2})?$/.test(sampleTime)) {
    format = sampleTime.split(" ")[1]!.split(":").length === 3 ? "DD/MM/YYYY hh:mm:ss" : "DD/MM/YYYY hh:mm";
    zone = "UTC";
    notes.push(`Times such as "${sampleTime}" read as day/month/year in UTC. Check the order and the zone.`);
  } else if (/^\d{9,10}(\.\d+)?$/.test(sampleTime)) format = "epoch_seconds";
  else if (/^\d{12,13}$/.test(sampleTime)) format = "epoch_milliseconds";
  if (!timeCols.length) notes.push("No time column was recognised: choose one.");

  const columns: ColumnMapping[] = [];
  const used = new Set<MeasuredVariable>();
  let platformColumn: string | number | undefined;
  for (let i = 0; i < width; i++) {
    if (timeCols.includes(i)) continue;
    const h = header?.[i] ?? "";
    if (header && PLATFORM_WORDS.test(norm(h)) && rows.some((r) => !isDataLike(r[i] ?? ""))) {
      platformColumn = ref(i);
      continue;
    }
    const v = header ? variableForHeader(h) : undefined;
    if (!v || used.has(v)) {
      if (header) notes.push(`Column "${h}" was not recognised and is left out.`);
      continue;
    }
    used.add(v);
    const { unit, why } = unitFor(v, header ? parseHeader(h).unit : null, columnValues(i));
    if (!why.startsWith("unit ")) notes.push(`Column "${h}": ${vocabulary[v].label}, ${why}.`);
    const conv = vocabulary[v].convention;
    columns.push({ column: ref(i), variable: v, unit, convention: conv, reference: "true", declinationDeg: 0 });
  }
  const map: ColumnMapInput = {
    ...base,
    missingValues: ["", "NaN", "nan", "NA", "-999", "-9999"],
    time: { columns: timeCols.map(ref), format, zone },
    ...(platformColumn !== undefined ? { platformColumn } : {}),
    columns,
  };
  return { map, source: "headers", notes };
}

export interface MapProblem {
  path: string;
  message: string;
}

/**
 * Checks a map for use: the shared schema (units fit variables, known names) plus what processing needs — a time
 * column, wind as speed and direction or both components, currents likewise, and columns that exist in the header.
 */
export function checkColumnMap(input: unknown, header?: string[] | null): { ok: true; map: ColumnMap; problems: [] } | { ok: false; problems: MapProblem[] } {
  const problems: MapProblem[] = [];
  const t = (input as ColumnMapInput | undefined)?.time;
  if (!t || !Array.isArray(t.columns) || t.columns.length === 0) problems.push({ path: "time.columns", message: "A time column is required: choose the column that holds the time of each record." });
  const parsed = columnMapSchema.safeParse(input);
  if (!parsed.success) {
    for (const i of parsed.error.issues) {
      const path = i.path.map(String).join(".");
      if (path.startsWith("time.columns") && problems.some((p) => p.path === "time.columns")) continue;
      problems.push({ path, message: path === "columns" && i.code === "too_small" ? "Map at least one column to a variable." : i.message });
    }
    return { ok: false, problems };
  }
  const map = parsed.data;
  const vars = new Set(map.columns.map((c) => resolveVariable(c.variable)?.canonical));
  const has = (v: MeasuredVariable) => vars.has(v);
  if ((has("wind_speed") || has("wind_from_direction")) && !(has("wind_speed") && has("wind_from_direction")) && !(has("eastward_wind") && has("northward_wind"))) {
    problems.push({ path: "columns", message: `Wind needs both speed and direction (or both eastward and northward components); this map has only ${has("wind_speed") ? "the speed" : "the direction"}.` });
  }
  if (has("eastward_wind") !== has("northward_wind")) problems.push({ path: "columns", message: "Wind components come in pairs: map both eastward and northward wind." });
  if ((has("sea_water_speed") || has("sea_water_velocity_to_direction")) && !(has("sea_water_speed") && has("sea_water_velocity_to_direction")) && !(has("eastward_sea_water_velocity") && has("northward_sea_water_velocity"))) {
    problems.push({ path: "columns", message: `Currents need both speed and direction (or both components); this map has only ${has("sea_water_speed") ? "the speed" : "the direction"}.` });
  }
  if (has("eastward_sea_water_velocity") !== has("northward_sea_water_velocity")) problems.push({ path: "columns", message: "Current components come in pairs: map both eastward and northward velocity." });
  if (has("latitude") !== has("longitude")) problems.push({ path: "columns", message: "Positions need both latitude and longitude." });
  const timeRefs = map.time.columns.map(String);
  map.columns.forEach((c, i) => {
    if (timeRefs.includes(String(c.column))) problems.push({ path: `columns.${i}.column`, message: `Column ${c.column} is the time column; it cannot also be ${c.variable}.` });
  });
  if (header) {
    const names = new Set(header);
    const missing = (r: string | number) => (typeof r === "number" ? r > header.length : !names.has(r));
    map.time.columns.forEach((r, i) => missing(r) && problems.push({ path: `time.columns.${i}`, message: `Time column "${r}" is not in this file's header.` }));
    map.columns.forEach((c, i) => missing(c.column) && problems.push({ path: `columns.${i}.column`, message: `Column "${c.column}" is not in this file's header.` }));
  }
  return problems.length ? { ok: false, problems } : { ok: true, map, problems: [] };
}
