/**
 * The public catalogue: released datasets, searchable and filterable, and each dataset's landing page.
 * One SQL query reads the (small) set of currently released datasets with what their version summary says;
 * filtering, sorting and paging then run in memory over that set.
 */
import type { Bounds, CatalogueItem, CataloguePage, CatalogueSearch, CitationForms, DatasetLanding } from "@shared/schemas/catalogue";
import type { Release } from "@shared/schemas/curation";
import { builtVersionStates } from "@shared/schemas/versions";
import { derivedVocabulary, vocabulary } from "@shared/vocabulary";
import { pool } from "../db/client";
import type { SessionUser } from "../middleware/require-session";
import { getDataset } from "./datasets";
import { variableMeta, versionVariables } from "./downloads";
import { listDatasetReleases } from "./releases";

interface Row {
  id: string;
  title: string;
  licence: string;
  project_name: string;
  platform_name: string | null;
  platform_kind: "mooring" | "drifter" | null;
  latitude: number | null;
  longitude: number | null;
  start_time: Date | null;
  end_time: Date | null;
  version_id: string;
  number: number;
  release_id: string;
  release_number: number;
  released_at: Date;
  release_licence: string;
  s_start: string | null;
  s_end: string | null;
  rows: number | null;
  variables: string[];
  lat_min: number | null;
  lat_max: number | null;
  lon_min: number | null;
  lon_max: number | null;
}

const CATALOGUE_SQL = `
select d.id, d.title, d.licence, p.name as project_name, pl.name as platform_name, pl.kind as platform_kind,
  dep.latitude, dep.longitude, dep.start_time, dep.end_time,
  v.id as version_id, v.number, r.id as release_id, r.release_number, r.released_at, r.licence as release_licence,
  v.summary->>'start' as s_start, v.summary->>'end' as s_end, (v.summary->>'rows')::float8 as rows,
  coalesce((select jsonb_agg(x->>'variable') from jsonb_array_elements(case when jsonb_typeof(v.summary->'variables') = 'array' then v.summary->'variables' else '[]'::jsonb end) x), '[]'::jsonb) as variables,
  (select (x->>'min')::float8 from jsonb_array_elements(case when jsonb_typeof(v.summary->'variables') = 'array' then v.summary->'variables' else '[]'::jsonb end) x where x->>'variable' = 'latitude') as lat_min,
  (select (x->>'max')::float8 from jsonb_array_elements(case when jsonb_typeof(v.summary->'variables') = 'array' then v.summary->'variables' else '[]'::jsonb end) x where x->>'variable' = 'latitude') as lat_max,
  (select (x->>'min')::float8 from jsonb_array_elements(case when jsonb_typeof(v.summary->'variables') = 'array' then v.summary->'variables' else '[]'::jsonb end) x where x->>'variable' = 'longitude') as lon_min,
  (select (x->>'max')::float8 from jsonb_array_elements(case when jsonb_typeof(v.summary->'variables') = 'array' then v.summary->'variables' else '[]'::jsonb end) x where x->>'variable' = 'longitude') as lon_max
from versions v
join releases r on r.version_id = v.id
join datasets d on d.id = v.dataset_id
join projects p on p.id = d.project_id
left join deployments dep on dep.id = d.deployment_id
left join platforms pl on pl.id = dep.platform_id
where v.state = 'released'`;

const finite = (x: number | null | undefined): x is number => typeof x === "number" && Number.isFinite(x);

function boundsOf(r: Pick<Row, "lat_min" | "lat_max" | "lon_min" | "lon_max" | "latitude" | "longitude">): Bounds | null {
  if (finite(r.lat_min) && finite(r.lat_max) && finite(r.lon_min) && finite(r.lon_max)) {
    return { west: r.lon_min, south: r.lat_min, east: r.lon_max, north: r.lat_max };
  }
  if (finite(r.latitude) && finite(r.longitude)) return { west: r.longitude, south: r.latitude, east: r.longitude, north: r.latitude };
  return null;
}

function toItem(r: Row): CatalogueItem {
  const start = r.s_start ?? r.start_time?.toISOString() ?? null;
  const end = r.s_end ?? (r.s_start ? null : (r.end_time?.toISOString() ?? null));
  return {
    id: r.id,
    title: r.title,
    projectName: r.project_name,
    platformName: r.platform_name,
    platformKind: r.platform_kind,
    latitude: r.latitude,
    longitude: r.longitude,
    bounds: boundsOf(r),
    startTime: start,
    endTime: end,
    variables: versionVariables({ variables: r.variables.map((variable) => ({ variable })) }),
    releasedVersion: r.number,
    releasedVersionId: r.version_id,
    releaseId: r.release_id,
    releaseNumber: r.release_number,
    releasedAt: r.released_at.toISOString(),
    licence: r.release_licence ?? r.licence,
    rows: finite(r.rows) ? r.rows : null,
  };
}

/** Words people may use for a variable: its key, its label and its CF standard name. */
function variableWords(name: string): string {
  const m = (vocabulary as Record<string, { label: string }>)[name];
  const d = (derivedVocabulary as Record<string, { longName: string; standardName?: string }>)[name];
  return [name, name.replace(/_/g, " "), m?.label, d?.longName, d?.standardName].filter(Boolean).join(" ");
}

function lonInside(lon: number, west: number, east: number) {
  return west <= east ? lon >= west && lon <= east : lon >= west || lon <= east;
}

/** True when two boxes share any point (the query box may cross the antimeridian). */
function intersects(b: Bounds, q: NonNullable<CatalogueSearch["bbox"]>): boolean {
  if (b.north < q.south || b.south > q.north) return false;
  if (lonInside(b.west, q.west, q.east) || lonInside(b.east, q.west, q.east)) return true;
  // The item's span covers the whole query span.
  return q.west <= q.east && b.west <= q.west && b.east >= q.east;
}

/** One collator for every sort: building one per comparison (localeCompare with a locale) is slow. */
const collator = new Intl.Collator("en");
/** Lower-case search text of an item, built once per item. */
const haystacks = new WeakMap<CatalogueItem, string>();
function haystackOf(it: CatalogueItem): string {
  let h = haystacks.get(it);
  if (h === undefined) {
    h = [it.title, it.projectName, it.platformName ?? "", ...it.variables.map(variableWords)].join(" ").toLowerCase();
    haystacks.set(it, h);
  }
  return h;
}

/** Filters, sorts and pages the released datasets. */
export function searchItems(all: CatalogueItem[], q: CatalogueSearch): CataloguePage {
  const words = (q.q ?? "").toLowerCase().split(/\s+/).filter(Boolean);
  const fromMs = q.from ? Date.parse(q.from) : null;
  const toMs = q.to ? Date.parse(q.to) : null;
  const items = all.filter((it) => {
    if (q.kind && it.platformKind !== q.kind) return false;
    if (q.variables && !q.variables.every((v) => it.variables.includes(v))) return false;
    if (q.bbox && (!it.bounds || !intersects(it.bounds, q.bbox))) return false;
    if (fromMs !== null && it.endTime && Date.parse(it.endTime) < fromMs) return false;
    if (toMs !== null && it.startTime && Date.parse(it.startTime) > toMs) return false;
    if ((fromMs !== null || toMs !== null) && !it.startTime && !it.endTime) return false;
    if (words.length) {
      const hay = haystackOf(it);
      if (!words.every((w) => hay.includes(w))) return false;
    }
    return true;
  });
  const time = (s: string | null, missing: number) => (s ? Date.parse(s) : missing);
  const by: Record<CatalogueSearch["sort"], (a: CatalogueItem, b: CatalogueItem) => number> = {
    released: (a, b) => b.releasedAt.localeCompare(a.releasedAt),
    title: (a, b) => collator.compare(a.title, b.title),
    start: (a, b) => time(a.startTime, Infinity) - time(b.startTime, Infinity),
    end: (a, b) => time(b.endTime, -Infinity) - time(a.endTime, -Infinity),
  };
  items.sort((a, b) => by[q.sort](a, b) || collator.compare(a.title, b.title) || (a.id < b.id ? -1 : a.id > b.id ? 1 : 0));
  const start = (q.page - 1) * q.pageSize;
  return { items: items.slice(start, start + q.pageSize), total: items.length, page: q.page, pageSize: q.pageSize };
}

/**
 * What the public catalogue depends on changes only when something is released or retracted, so answers are
 * kept while this stamp (one cheap query on the small releases table) stays the same. Edits to a dataset's
 * title or description show after at most CACHE_MS.
 */
const CACHE_MS = 5_000;
/** The stamp is read at most this often; releases made in this process reset it at once (invalidateCatalogue). */
const STAMP_MS = 1_000;
let stampCache: { at: number; value: Promise<string> } | null = null;
async function releaseStamp(): Promise<string> {
  if (stampCache && Date.now() - stampCache.at < STAMP_MS) return stampCache.value;
  const value = pool.query(`select count(*)::int as n, max(released_at) as r, max(retracted_at) as x from releases`).then((r) => JSON.stringify(r.rows[0]));
  stampCache = { at: Date.now(), value };
  value.catch(() => (stampCache = null));
  return value;
}

/** Forgets kept catalogue answers (called after a release or retraction in this process). */
export function invalidateCatalogue() {
  stampCache = null;
  listCache = null;
  landingCache.clear();
}
let listCache: { stamp: string; at: number; items: Promise<CatalogueItem[]> } | null = null;
const landingCache = new Map<string, { stamp: string; at: number; value: Promise<DatasetLanding> }>();

/** Every dataset with a live release (the catalogue's whole set, before filters). */
export async function releasedDatasets(): Promise<CatalogueItem[]> {
  const stamp = await releaseStamp();
  if (listCache && listCache.stamp === stamp && Date.now() - listCache.at < CACHE_MS) return listCache.items;
  const items = pool.query<Row>(CATALOGUE_SQL).then((r) => r.rows.map(toItem));
  listCache = { stamp, at: Date.now(), items };
  items.catch(() => (listCache = null));
  return items;
}

// GET /api/v1/catalogue
/** The catalogue page for a search: released datasets only, whoever asks. */
export async function searchCatalogue(q: CatalogueSearch): Promise<CataloguePage> {
  return searchItems(await releasedDatasets(), q);
}

const bibEscape = (s: string) => s.replace(/([{}\\])/g, "\\$1").replace(/([&%$#_])/g, "\\$1");

/** A release's citation as plain text (the release's own, unchanged), BibTeX and RIS. */
export function citationForms(r: Release): CitationForms {
  const year = r.releasedAt.slice(0, 4);
  const key = `tauline_${r.datasetTitle.toLowerCase().replace(/[^a-z0-9]+/g, "_").replace(/^_|_$/g, "").slice(0, 40)}_v${r.versionNumber}`;
  const bibtex = [
    `@misc{${key},`,
    `  author = {${r.authors.map(bibEscape).join(" and ")}},`,
    `  title = {{${bibEscape(r.datasetTitle)}, version ${r.versionNumber}}},`,
    `  year = {${year}},`,
    `  publisher = {${bibEscape(r.projectName)}},`,
    `  howpublished = {Tauline release ${r.releaseNumber}},`,
    `  note = {Data set. Licence ${r.licence}},`,
    `  url = {${r.stableUrl}}`,
    `}`,
  ].join("\n");
  const ris = [
    "TY  - DATA",
    ...r.authors.map((a) => `AU  - ${a}`),
    `TI  - ${r.datasetTitle}`,
    `ET  - version ${r.versionNumber}`,
    `PY  - ${year}`,
    `DA  - ${r.releasedAt.slice(0, 10).replace(/-/g, "/")}`,
    `PB  - ${r.projectName}`,
    `UR  - ${r.stableUrl}`,
    `N1  - Tauline release ${r.releaseNumber}. Licence ${r.licence}`,
    "ER  - ",
  ].join("\r\n");
  return { text: r.citation, bibtex, ris };
}

interface SummaryVar {
  variable: string;
  count?: number;
  min?: number | null;
  max?: number | null;
  flags?: number[];
}

// GET /api/v1/datasets/:id/landing
/**
 * A dataset's landing page. Visitors see it once a version is released (else 401, or 403 when signed in but
 * not a member); members also see their drafts, and the page then describes the newest built version.
 */
export async function getLanding(user: SessionUser | null | undefined, datasetId: string): Promise<DatasetLanding> {
  // Visitors all see the same page of a released dataset, so theirs is kept like the catalogue list.
  if (user) return buildLanding(user, datasetId);
  const stamp = await releaseStamp();
  const hit = landingCache.get(datasetId);
  if (hit && hit.stamp === stamp && Date.now() - hit.at < CACHE_MS) return hit.value;
  const value = buildLanding(null, datasetId);
  if (landingCache.size > 5000) landingCache.clear();
  landingCache.set(datasetId, { stamp, at: Date.now(), value });
  value.catch(() => landingCache.delete(datasetId));
  return value;
}

async function buildLanding(user: SessionUser | null | undefined, datasetId: string): Promise<DatasetLanding> {
  const dataset = await getDataset(user, datasetId);
  const releases = await listDatasetReleases(user, datasetId);
  const built = dataset.versions.find((v) => (builtVersionStates as readonly string[]).includes(v.state));
  const version = dataset.latestRelease ?? built ?? null;
  type Summary = { rows?: number; start?: string | null; end?: string | null; variables?: SummaryVar[] };
  let summary: Summary | null = null;
  if (version) {
    const { rows } = await pool.query<{ summary: Summary | null }>(`select summary from versions where id = $1`, [version.id]);
    summary = rows[0]?.summary ?? null;
  }
  const stats = new Map<string, SummaryVar>((summary?.variables ?? []).map((v) => [v.variable, v]));
  const variables = versionVariables(summary).map((name) => {
    const s = stats.get(name);
    return { ...variableMeta(name), count: s?.count ?? null, min: finite(s?.min) ? s!.min! : null, max: finite(s?.max) ? s!.max! : null, flags: s?.flags ?? [] };
  });
  const { rows: dep } = await pool.query<{ latitude: number | null; longitude: number | null; start_time: Date | null; end_time: Date | null }>(
    `select dep.latitude, dep.longitude, dep.start_time, dep.end_time from datasets d left join deployments dep on dep.id = d.deployment_id where d.id = $1`,
    [datasetId],
  );
  const d = dep[0];
  const lat = stats.get("latitude");
  const lon = stats.get("longitude");
  const bounds = boundsOf({
    lat_min: lat?.min ?? null,
    lat_max: lat?.max ?? null,
    lon_min: lon?.min ?? null,
    lon_max: lon?.max ?? null,
    latitude: d?.latitude ?? null,
    longitude: d?.longitude ?? null,
  });
  const live = releases.find((r) => !r.retracted && r.versionId === dataset.latestRelease?.id) ?? releases.find((r) => !r.retracted) ?? null;
  return {
    id: dataset.id,
    title: dataset.title,
    description: dataset.description,
    projectName: dataset.projectName,
    platformName: dataset.platformName,
    platformKind: dataset.platformKind,
    latitude: d?.latitude ?? null,
    longitude: d?.longitude ?? null,
    bounds,
    licence: live?.licence ?? dataset.licence,
    version,
    startTime: summary?.start ?? d?.start_time?.toISOString() ?? null,
    endTime: summary?.end ?? (summary?.start ? null : (d?.end_time?.toISOString() ?? null)),
    rows: finite(summary?.rows) ? summary!.rows! : null,
    variables,
    versions: dataset.versions,
    releases,
    citation: live ? citationForms(live) : null,
  };
}
