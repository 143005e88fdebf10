import { randomUUID } from "node:crypto";
import { beforeAll, describe, expect, test } from "vitest";
import { eq } from "drizzle-orm";
import { db } from "../../server/db/client";
import { releases } from "../../server/db/schema";
import { buildReleaseFiles } from "../../server/jobs/release-files.job";
import { routeRules } from "../../server/lib/routes";
import { createToken } from "../../server/services/tokens";
import { addMembership, as, createTestUser, makeProjectWithRoles, testApp, type Role, type TestUser } from "../helpers/api";
import { makeDataset, makeVersion } from "../helpers/curation";
import { buildMooringVersion } from "../helpers/explore";
import { pool } from "../../server/db/client";
import { makeBuildVersion, makeMooringDataset, mooringMap, mooringText, storeUpload } from "../helpers/pipeline";
import { storeTestUpload } from "../helpers/uploads";

/**
 * Every API route × every role, expected statuses in one table. A route the API declares without an
 * entry here fails the suite (deny by default: SECURITY.md "Who may do what").
 */
type Ids = { projectId: string; platformId: string; deploymentId: string; datasetId: string; users: Record<Exclude<Role, "visitor">, TestUser> };
interface Case {
  /** Returns the concrete URL and body for one call (fresh objects where a call would collide). */
  call: (ids: Ids) => Promise<{ url: string; body?: unknown }> | { url: string; body?: unknown };
  expect: Record<Role, number>;
}
const u = () => randomUUID().slice(0, 6);
const readMembers = { visitor: 401, outsider: 403, contributor: 200, curator: 200, admin: 200 };
const writeMembers = { visitor: 401, outsider: 403, contributor: 200, curator: 200, admin: 200 };
const createMembers = { visitor: 401, outsider: 403, contributor: 201, curator: 201, admin: 201 };
const adminOnly = { visitor: 401, outsider: 403, contributor: 403, curator: 403, admin: 200 };
const anyone = { visitor: 200, outsider: 200, contributor: 200, curator: 200, admin: 200 };
const signedIn = { visitor: 401, outsider: 200, contributor: 200, curator: 200, admin: 200 };

const curatorsOnly = { visitor: 401, outsider: 403, contributor: 403, curator: 200, admin: 200 };
/** A fresh version of the matrix dataset, built and uploaded by the contributor (so curators may review it). */
const curationVersion = (i: Ids, state: "ready" | "in_review" | "approved") =>
  makeVersion({ datasetId: i.datasetId, state, createdBy: i.users.contributor.id, uploaderId: i.users.contributor.id });
async function releasedVersion(i: Ids) {
  const v = await curationVersion(i, "approved");
  const res = await as(i.users.curator.cookie).post(`/api/versions/${v}/release`).send({});
  expect(res.status).toBe(201);
  return v;
}

/** One built (unreleased) version with records, shared by the explore rows. */
let built: Promise<{ id: string; datasetId: string }> | undefined;
const builtVersion = (i: Ids) =>
  (built ??= (async () => {
    const { datasetId } = await makeMooringDataset(i.projectId);
    const v = await buildMooringVersion(datasetId, i.users.contributor, { start: Date.UTC(2026, 9, 1) / 1000, durationS: 6 * 3600, intervalS: 60 });
    return { id: v.id, datasetId };
  })());
/** A fresh note on the built version's dataset (so each PATCH/DELETE has its own). */
async function freshAnnotation(i: Ids) {
  const { datasetId } = await builtVersion(i);
  const r = await pool.query(`insert into annotations (dataset_id, start_time, end_time, variables, note) values ($1, '2026-10-01T01:00:00Z', '2026-10-01T02:00:00Z', '{wind_speed}', 'Matrix note') returning id`, [datasetId]);
  return r.rows[0].id as string;
}

/** A fresh release of the matrix dataset; its id. */
async function releaseOf(i: Ids) {
  const v = await releasedVersion(i);
  const [r] = await db.select({ id: releases.id }).from(releases).where(eq(releases.versionId, v));
  return r!.id;
}
const sessionOf = (t: TestUser) => ({ id: t.id, name: t.name, email: t.email, emailVerified: true, isAdmin: false });

const matrix: Record<string, Case> = {
  "GET /api/me": { call: () => ({ url: "/api/me" }), expect: signedIn },
  "GET /api/catalogue": { call: () => ({ url: "/api/catalogue" }), expect: anyone },
  "GET /api/projects": { call: () => ({ url: "/api/projects" }), expect: signedIn },
  "POST /api/projects": {
    call: () => ({ url: "/api/projects", body: { name: `Matrix project ${u()}`, slug: `matrix-${u()}` } }),
    expect: { ...adminOnly, admin: 201 },
  },
  "GET /api/projects/:id": { call: (i) => ({ url: `/api/projects/${i.projectId}` }), expect: readMembers },
  "PATCH /api/projects/:id": {
    call: (i) => ({ url: `/api/projects/${i.projectId}`, body: { description: `edited ${u()}` } }),
    expect: { visitor: 401, outsider: 403, contributor: 403, curator: 200, admin: 200 },
  },
  "GET /api/projects/:id/members": { call: (i) => ({ url: `/api/projects/${i.projectId}/members` }), expect: readMembers },
  "POST /api/projects/:id/members": {
    call: async (i) => ({ url: `/api/projects/${i.projectId}/members`, body: { email: (await createTestUser()).email, role: "contributor" } }),
    expect: { ...adminOnly, admin: 201 },
  },
  "DELETE /api/projects/:id/members/:userId": {
    call: async (i) => {
      const t = await createTestUser();
      await addMembership(i.projectId, t.id, "contributor");
      return { url: `/api/projects/${i.projectId}/members/${t.id}` };
    },
    expect: { ...adminOnly, admin: 204 },
  },
  "GET /api/projects/:id/platforms": { call: (i) => ({ url: `/api/projects/${i.projectId}/platforms` }), expect: readMembers },
  "POST /api/projects/:id/platforms": {
    call: (i) => ({ url: `/api/projects/${i.projectId}/platforms`, body: { name: `Buoy ${u()}`, kind: "mooring" } }),
    expect: createMembers,
  },
  "GET /api/projects/:id/datasets": { call: (i) => ({ url: `/api/projects/${i.projectId}/datasets` }), expect: readMembers },
  "POST /api/projects/:id/datasets": {
    call: (i) => ({ url: `/api/projects/${i.projectId}/datasets`, body: { title: `Series ${u()}`, deploymentId: i.deploymentId } }),
    expect: createMembers,
  },
  "GET /api/platforms/:id": { call: (i) => ({ url: `/api/platforms/${i.platformId}` }), expect: readMembers },
  "PATCH /api/platforms/:id": { call: (i) => ({ url: `/api/platforms/${i.platformId}`, body: { description: `edited ${u()}` } }), expect: writeMembers },
  "GET /api/platforms/:id/deployments": { call: (i) => ({ url: `/api/platforms/${i.platformId}/deployments` }), expect: readMembers },
  "POST /api/platforms/:id/deployments": {
    call: (i) => ({ url: `/api/platforms/${i.platformId}/deployments`, body: { name: `D-${u()}`, startTime: "2026-01-01T00:00:00Z" } }),
    expect: createMembers,
  },
  "GET /api/deployments/:id": { call: (i) => ({ url: `/api/deployments/${i.deploymentId}` }), expect: readMembers },
  "PATCH /api/deployments/:id": { call: (i) => ({ url: `/api/deployments/${i.deploymentId}`, body: { notes: `edited ${u()}` } }), expect: writeMembers },
  "GET /api/deployments/:id/qc-settings": { call: (i) => ({ url: `/api/deployments/${i.deploymentId}/qc-settings` }), expect: readMembers },
  "PATCH /api/deployments/:id/qc-settings": {
    call: (i) => ({ url: `/api/deployments/${i.deploymentId}/qc-settings`, body: { overrides: { variables: { wind_speed: { user: { min: 0, max: 30 } } } } } }),
    expect: writeMembers,
  },
  // The dataset has no release yet, so only members see it.
  "GET /api/datasets/:id": { call: (i) => ({ url: `/api/datasets/${i.datasetId}` }), expect: readMembers },
  "PATCH /api/datasets/:id": { call: (i) => ({ url: `/api/datasets/${i.datasetId}`, body: { description: `edited ${u()}` } }), expect: writeMembers },
  "GET /api/review-queue": { call: () => ({ url: "/api/review-queue" }), expect: signedIn },
  "GET /api/versions/:id/review": { call: async (i) => ({ url: `/api/versions/${await curationVersion(i, "in_review")}/review` }), expect: readMembers },
  "GET /api/versions/:id/compare": { call: async (i) => ({ url: `/api/versions/${await curationVersion(i, "in_review")}/compare` }), expect: readMembers },
  "POST /api/versions/:id/submit": { call: async (i) => ({ url: `/api/versions/${await curationVersion(i, "ready")}/submit`, body: {} }), expect: writeMembers },
  "POST /api/versions/:id/approve": { call: async (i) => ({ url: `/api/versions/${await curationVersion(i, "in_review")}/approve`, body: {} }), expect: curatorsOnly },
  "POST /api/versions/:id/reject": {
    call: async (i) => ({ url: `/api/versions/${await curationVersion(i, "in_review")}/reject`, body: { reason: "Spikes in wind speed left unflagged" } }),
    expect: curatorsOnly,
  },
  "POST /api/versions/:id/request-changes": {
    call: async (i) => ({ url: `/api/versions/${await curationVersion(i, "in_review")}/request-changes`, body: { reason: "Map the gust column" } }),
    expect: curatorsOnly,
  },
  "POST /api/versions/:id/release": {
    call: async (i) => ({ url: `/api/versions/${await curationVersion(i, "approved")}/release`, body: {} }),
    expect: { ...curatorsOnly, curator: 201, admin: 201 },
  },
  "POST /api/versions/:id/retract": {
    call: async (i) => ({ url: `/api/versions/${await releasedVersion(i)}/retract`, body: { reason: "Clock drift found after release" } }),
    expect: curatorsOnly,
  },
  "GET /api/versions/:id/comments": { call: async (i) => ({ url: `/api/versions/${await curationVersion(i, "in_review")}/comments` }), expect: readMembers },
  "POST /api/versions/:id/comments": {
    call: async (i) => ({ url: `/api/versions/${await curationVersion(i, "in_review")}/comments`, body: { body: "Gaps on 12 March?" } }),
    expect: createMembers,
  },
  // Releases are public, retracted ones included (as tombstones).
  "GET /api/releases/:id": {
    call: async (i) => {
      const v = await releasedVersion(i);
      const rel = await as(i.users.curator.cookie).get(`/api/versions/${v}/review`);
      return { url: `/api/releases/${rel.body.releaseId}` };
    },
    expect: anyone,
  },
  // A dataset without a release: its (empty) release list and follow button are as private as the dataset.
  "GET /api/datasets/:id/releases": { call: async (i) => ({ url: `/api/datasets/${await makeDataset(i.projectId)}/releases` }), expect: readMembers },
  "GET /api/datasets/:id/follow": { call: async (i) => ({ url: `/api/datasets/${await makeDataset(i.projectId)}/follow` }), expect: readMembers },
  "POST /api/datasets/:id/follow": { call: async (i) => ({ url: `/api/datasets/${await makeDataset(i.projectId)}/follow`, body: {} }), expect: writeMembers },
  "DELETE /api/datasets/:id/follow": { call: async (i) => ({ url: `/api/datasets/${await makeDataset(i.projectId)}/follow` }), expect: writeMembers },
  "GET /api/notifications": { call: () => ({ url: "/api/notifications" }), expect: signedIn },
  "POST /api/notifications/read": { call: () => ({ url: "/api/notifications/read", body: { all: true } }), expect: signedIn },
  // Version builds (issue 5): a fresh dataset per call, since a dataset builds one version at a time.
  "POST /api/datasets/:id/versions": {
    call: async (i) => {
      const { datasetId } = await makeMooringDataset(i.projectId);
      const uploadId = await storeUpload(datasetId, i.users.contributor.id, mooringText({ durationS: 600, intervalS: 60 }));
      return { url: `/api/datasets/${datasetId}/versions`, body: { uploadId, columnMap: mooringMap(), mode: "replace" } };
    },
    expect: createMembers,
  },
  "GET /api/versions/:id": { call: async (i) => ({ url: `/api/versions/${(await makeBuildVersion(i.projectId, i.users.contributor.id, "ready", "succeeded")).versionId}` }), expect: readMembers },
  "GET /api/versions/:id/progress": {
    call: async (i) => ({ url: `/api/versions/${(await makeBuildVersion(i.projectId, i.users.contributor.id, "ready", "succeeded")).versionId}/progress` }),
    expect: readMembers,
  },
  "POST /api/versions/:id/cancel": {
    call: async (i) => ({ url: `/api/versions/${(await makeBuildVersion(i.projectId, i.users.contributor.id, "processing", "queued")).versionId}/cancel`, body: {} }),
    expect: writeMembers,
  },
  "POST /api/versions/:id/retry": {
    call: async (i) => ({ url: `/api/versions/${(await makeBuildVersion(i.projectId, i.users.contributor.id, "failed", "failed")).versionId}/retry`, body: {} }),
    expect: writeMembers,
  },
  "GET /api/projects/:id/array-diagnostics": { call: (i) => ({ url: `/api/projects/${i.projectId}/array-diagnostics` }), expect: readMembers },
  "GET /api/v1/projects/:id/array-diagnostics": { call: (i) => ({ url: `/api/v1/projects/${i.projectId}/array-diagnostics?format=csv` }), expect: readMembers },
  "GET /api/admin/users": { call: () => ({ url: "/api/admin/users" }), expect: adminOnly },
  "PATCH /api/admin/users/:id": {
    call: async () => ({ url: `/api/admin/users/${(await createTestUser()).id}`, body: { isAdmin: false } }),
    expect: adminOnly,
  },
  "GET /api/admin/mail": { call: () => ({ url: "/api/admin/mail" }), expect: adminOnly },
  // Explore: an unreleased version's plots, records, report and track are for members (public once released).
  "GET /api/versions/:id/plot": { call: async (i) => ({ url: `/api/versions/${(await builtVersion(i)).id}/plot?variables=wind_speed` }), expect: readMembers },
  "GET /api/versions/:id/records": { call: async (i) => ({ url: `/api/versions/${(await builtVersion(i)).id}/records?limit=5` }), expect: readMembers },
  "GET /api/versions/:id/qc-report": { call: async (i) => ({ url: `/api/versions/${(await builtVersion(i)).id}/qc-report` }), expect: readMembers },
  "GET /api/versions/:id/track": { call: async (i) => ({ url: `/api/versions/${(await builtVersion(i)).id}/track` }), expect: readMembers },
  "GET /api/datasets/:id/annotations": { call: async (i) => ({ url: `/api/datasets/${(await builtVersion(i)).datasetId}/annotations` }), expect: readMembers },
  "POST /api/datasets/:id/annotations": {
    call: async (i) => ({
      url: `/api/datasets/${(await builtVersion(i)).datasetId}/annotations`,
      body: { from: "2026-10-01T01:00:00Z", to: "2026-10-01T01:30:00Z", variables: ["wind_speed"], note: "Matrix note" },
    }),
    expect: createMembers,
  },
  "PATCH /api/annotations/:id": { call: async (i) => ({ url: `/api/annotations/${await freshAnnotation(i)}`, body: { note: "Edited" } }), expect: writeMembers },
  "DELETE /api/annotations/:id": { call: async (i) => ({ url: `/api/annotations/${await freshAnnotation(i)}` }), expect: writeMembers },
  "GET /api/datasets/:id/uploads": { call: (i) => ({ url: `/api/datasets/${i.datasetId}/uploads` }), expect: readMembers },
  "GET /api/uploads/:id": {
    call: async (i) => ({ url: `/api/uploads/${await storeTestUpload(i.datasetId, i.users.contributor.id, "time,wspd,wdir\n2026-01-01T00:00:00Z,3.1,180\n")}` }),
    expect: readMembers,
  },
  "GET /api/platforms/:id/column-maps": { call: (i) => ({ url: `/api/platforms/${i.platformId}/column-maps` }), expect: readMembers },
  "POST /api/platforms/:id/column-maps": {
    call: (i) => ({
      url: `/api/platforms/${i.platformId}/column-maps`,
      body: { map: { time: { columns: ["time"], zone: "UTC" }, columns: [{ column: "u", variable: "eastward_wind", unit: "m s-1" }, { column: "v", variable: "northward_wind", unit: "m s-1" }] }, note: `matrix ${u()}` },
    }),
    expect: createMembers,
  },
  // Public catalogue, downloads, tokens and the API description (issue 8). Dataset rows use a fresh, unreleased dataset.
  "GET /api/v1/catalogue": { call: () => ({ url: "/api/v1/catalogue?q=merrow&sort=title" }), expect: anyone },
  "GET /api/v1/datasets/:id": { call: async (i) => ({ url: `/api/v1/datasets/${await makeDataset(i.projectId)}` }), expect: readMembers },
  "GET /api/v1/datasets/:id/landing": { call: async (i) => ({ url: `/api/v1/datasets/${await makeDataset(i.projectId)}/landing` }), expect: readMembers },
  "GET /api/v1/datasets/:id/releases": { call: async (i) => ({ url: `/api/v1/datasets/${await makeDataset(i.projectId)}/releases` }), expect: readMembers },
  "GET /api/v1/releases/:id": { call: async (i) => ({ url: `/api/v1/releases/${await releaseOf(i)}` }), expect: anyone },
  "GET /api/v1/releases/:id/files/:name": {
    call: async (i) => {
      const id = await releaseOf(i);
      const [name] = await buildReleaseFiles(id);
      return { url: `/api/v1/releases/${id}/files/${name}` };
    },
    expect: anyone,
  },
  "GET /api/v1/releases/:id/verify": { call: async (i) => ({ url: `/api/v1/releases/${await releaseOf(i)}/verify` }), expect: anyone },
  "GET /api/v1/versions/:id/download": { call: async (i) => ({ url: `/api/v1/versions/${await curationVersion(i, "ready")}/download` }), expect: readMembers },
  "GET /api/v1/tokens": { call: () => ({ url: "/api/v1/tokens" }), expect: signedIn },
  "POST /api/v1/tokens": { call: () => ({ url: "/api/v1/tokens", body: { name: `matrix ${u()}`, scope: "read" } }), expect: { ...signedIn, outsider: 201, contributor: 201, curator: 201, admin: 201 } },
  // Someone's own token: only its owner (the contributor here) may revoke it; to anyone else it does not exist.
  "DELETE /api/v1/tokens/:id": {
    call: async (i) => ({ url: `/api/v1/tokens/${(await createToken(sessionOf(i.users.contributor), { name: `matrix ${u()}`, scope: "read" })).id}` }),
    expect: { visitor: 401, outsider: 404, contributor: 200, curator: 404, admin: 404 },
  },
  "GET /api/v1/openapi.json": { call: () => ({ url: "/api/v1/openapi.json" }), expect: anyone },
};

let ids: Ids;
beforeAll(async () => {
  testApp(); // registers every route
  const setup = await makeProjectWithRoles();
  const c = as(setup.users.contributor.cookie);
  const platform = await c.post(`/api/projects/${setup.projectId}/platforms`).send({ name: "Matrix mooring", kind: "mooring" });
  const deployment = await c.post(`/api/platforms/${platform.body.id}/deployments`).send({ name: "M-1", startTime: "2026-01-01T00:00:00Z" });
  const dataset = await c.post(`/api/projects/${setup.projectId}/datasets`).send({ title: "Matrix series", deploymentId: deployment.body.id });
  expect(dataset.status).toBe(201);
  ids = { projectId: setup.projectId, platformId: platform.body.id, deploymentId: deployment.body.id, datasetId: dataset.body.id, users: setup.users };
});

describe("role × route matrix", () => {
  test("every declared route has an entry in the matrix, and every entry is a declared route", () => {
    const declared = routeRules.map((r) => `${r.method} ${r.path}`).sort();
    expect(declared.filter((k) => !(k in matrix))).toEqual([]);
    expect(Object.keys(matrix).filter((k) => !declared.includes(k))).toEqual([]);
  });

  const roles: Role[] = ["visitor", "outsider", "contributor", "curator", "admin"];
  for (const [key, c] of Object.entries(matrix)) {
    test(`${key}: ${roles.map((r) => `${r} ${c.expect[r]}`).join(", ")}`, async () => {
      const [method, path] = key.split(" ") as [string, string];
      const got: Record<string, number> = {};
      for (const role of roles) {
        const { url, body } = await c.call(ids);
        const client = as(role === "visitor" ? null : ids.users[role].cookie);
        const m = method.toLowerCase() as "get" | "post" | "patch" | "delete";
        const res = body === undefined ? await client[m](url) : await client[m](url).send(body as object);
        got[role] = res.status;
        if (res.status >= 400) expect(res.body.error?.code, `${role} ${path}`).toBeTypeOf("string");
      }
      expect(got).toEqual(c.expect);
    });
  }
});
