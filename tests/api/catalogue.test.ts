import { randomUUID } from "node:crypto";
import { beforeAll, describe, expect, test } from "vitest";
import { as } from "../helpers/api";
import { releasedFixture } from "../helpers/released";

const tag = randomUUID().slice(0, 6);
let north: Awaited<ReturnType<typeof releasedFixture>>;
let south: Awaited<ReturnType<typeof releasedFixture>>;

beforeAll(async () => {
  // Two invented Merrow Shelf moorings, far apart; both released through the curation route.
  north = await releasedFixture({ rows: 20, title: `Merrow North ${tag}`, latitude: 58.5, longitude: -12 });
  south = await releasedFixture({ rows: 20, title: `Merrow South ${tag}`, latitude: 35.25, longitude: 150 });
});

const search = async (qs: string) => {
  const res = await as(null).get(`/api/v1/catalogue?${qs}`);
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return res.body as { items: { id: string; title: string; variables: string[]; releaseId: string }[]; total: number; page: number; pageSize: number };
};

describe("catalogue search", () => {
  test("text search matches title, project, platform and variable names (CF names and labels)", async () => {
    expect((await search(`q=${tag}`)).items.map((i) => i.title).sort()).toEqual([`Merrow North ${tag}`, `Merrow South ${tag}`]);
    expect((await search(`q=north ${tag}`)).items.map((i) => i.id)).toEqual([north.datasetId]);
    const byVariable = await search(`q=${tag} air temperature`);
    expect(byVariable.total).toBe(2);
    expect(byVariable.items[0]!.variables).toContain("magnitude_of_surface_downward_stress");
    expect((await search(`q=${tag} sea_ice`)).total).toBe(0);
  });

  test("area: a box holds only datasets inside it; a box across the antimeridian works", async () => {
    expect((await search(`q=${tag}&bbox=-20,50,0,60`)).items.map((i) => i.id)).toEqual([north.datasetId]);
    expect((await search(`q=${tag}&bbox=140,30,-170,40`)).items.map((i) => i.id)).toEqual([south.datasetId]);
    expect((await search(`q=${tag}&bbox=0,0,10,10`)).total).toBe(0);
  });

  test("time overlap, variables, platform kind", async () => {
    // The fixture's records start 2026-03-01.
    expect((await search(`q=${tag}&from=2026-02-01T00:00:00Z&to=2026-03-01T01:00:00Z`)).total).toBe(2);
    expect((await search(`q=${tag}&to=2026-02-01T00:00:00Z`)).total).toBe(0);
    expect((await search(`q=${tag}&from=2027-01-01T00:00:00Z`)).total).toBe(0);
    expect((await search(`q=${tag}&variables=wind_speed,air_temperature`)).total).toBe(2);
    expect((await search(`q=${tag}&variables=wind_speed,sea_water_temperature`)).total).toBe(0);
    expect((await search(`q=${tag}&kind=mooring`)).total).toBe(2);
    expect((await search(`q=${tag}&kind=drifter`)).total).toBe(0);
  });

  test("sorting and pages", async () => {
    const byTitle = await search(`q=${tag}&sort=title`);
    expect(byTitle.items.map((i) => i.title)).toEqual([`Merrow North ${tag}`, `Merrow South ${tag}`]);
    const newest = await search(`q=${tag}&sort=released`);
    expect(newest.items[0]!.id).toBe(south.datasetId);
    const p2 = await search(`q=${tag}&sort=title&pageSize=1&page=2`);
    expect(p2).toMatchObject({ total: 2, page: 2, pageSize: 1 });
    expect(p2.items.map((i) => i.title)).toEqual([`Merrow South ${tag}`]);
  });

  test("drafts never show; bad filters name the field", async () => {
    const all = await search(`pageSize=100&q=${tag}`);
    expect(all.items.every((i) => i.releaseId)).toBe(true);
    const bad = await as(null).get("/api/v1/catalogue?bbox=1,2,3&sort=size&pageSize=500&from=today");
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.details).sort()).toEqual(["bbox", "from", "pageSize", "sort"]);
  });
});

describe("landing page", () => {
  test("variables with CF standard names and units, coverage, releases with the citation in three forms", async () => {
    const res = await as(null).get(`/api/v1/datasets/${north.datasetId}/landing`);
    expect(res.status).toBe(200);
    const l = res.body;
    expect(l.title).toBe(`Merrow North ${tag}`);
    expect(l.bounds).toEqual({ west: -12, south: 58.5, east: -12, north: 58.5 });
    expect(l.startTime).toBe("2026-03-01T00:00:00.000Z");
    // CF standard-name table: air_temperature in K; wind stress magnitude in Pa (canonical units of shared/vocabulary).
    expect(l.variables.find((v: { name: string }) => v.name === "air_temperature")).toMatchObject({ standardName: "air_temperature", units: "K" });
    expect(l.variables.find((v: { name: string }) => v.name === "magnitude_of_surface_downward_stress")).toMatchObject({ units: "Pa" });
    expect(l.releases).toHaveLength(1);
    expect(l.citation.text).toContain("Ada Merrow and Bram Tideway");
    // BibTeX: one entry, authors joined by " and ", braces balanced.
    expect(l.citation.bibtex).toMatch(/^@misc\{tauline_merrow_north_[a-z0-9_]+_v1,\n/);
    expect(l.citation.bibtex).toContain("author = {Ada Merrow and Bram Tideway}");
    expect((l.citation.bibtex.match(/\{/g) ?? []).length).toBe((l.citation.bibtex.match(/\}/g) ?? []).length);
    // RIS: starts with TY, one AU per author, ends with ER (RIS tag format "XX  - ").
    const ris = l.citation.ris.split("\r\n");
    expect(ris[0]).toBe("TY  - DATA");
    expect(ris.filter((x: string) => x.startsWith("AU  - "))).toEqual(["AU  - Ada Merrow", "AU  - Bram Tideway"]);
    expect(ris.at(-1)).toBe("ER  - ");
    expect(l.licence).toBe("CC-BY-4.0");
  });

  test("a dataset with no release: visitor 401, outsider 403, member 200", async () => {
    const f = await releasedFixture({ rows: 2 });
    const { makeDataset } = await import("../helpers/curation");
    const d = await makeDataset(f.projectId);
    expect((await as(null).get(`/api/v1/datasets/${d}/landing`)).status).toBe(401);
    expect((await as(f.users.outsider.cookie).get(`/api/v1/datasets/${d}/landing`)).status).toBe(403);
    const m = await as(f.users.contributor.cookie).get(`/api/v1/datasets/${d}/landing`);
    expect(m.status).toBe(200);
    expect(m.body.citation).toBeNull();
  });
});
