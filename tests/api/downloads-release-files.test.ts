import { createHash } from "node:crypto";
import { readFileSync, writeFileSync } from "node:fs";
import request from "supertest";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { db, pool } from "../../server/db/client";
import { releaseFiles } from "../../server/db/schema";
import { buildReleaseFiles, RELEASE_FILES } from "../../server/jobs/release-files.job";
import { stopSender } from "../../server/jobs/queue";
import { pathForKey, releaseFileKey } from "../../server/lib/file-store";
import { as, testApp } from "../helpers/api";
import { releasedFixture } from "../helpers/released";

let f: Awaited<ReturnType<typeof releasedFixture>>;
const sha256 = (b: Buffer) => createHash("sha256").update(b).digest("hex");
const raw = (t: request.Test) =>
  t.buffer(true).parse((res, cb) => {
    const chunks: Buffer[] = [];
    res.on("data", (c: Buffer) => chunks.push(c));
    res.on("end", () => cb(null, Buffer.concat(chunks)));
  });

beforeAll(async () => {
  // 3,000 records make a CSV of several 64 kB reads, so a bad file is cut short mid-transfer.
  f = await releasedFixture({ rows: 3000 });
});
afterAll(async () => {
  await stopSender();
});

describe("whole-release files", () => {
  test("releasing queues the job that builds the files", async () => {
    // The queue (pg-boss) starts on first use, so wait for the row rather than assume it is there at once.
    let n = 0;
    for (const until = Date.now() + 20_000; Date.now() < until && n === 0; await new Promise((r) => setTimeout(r, 200))) {
      const { rows } = await pool
        .query(`select 1 from pgboss.job where name = $1 and data->>'releaseId' = $2`, [RELEASE_FILES, f.releaseId])
        .catch(() => ({ rows: [] as unknown[] }));
      n = rows.length;
    }
    expect(n).toBe(1);
  });

  test("built once: CSV, data package and Parquet with their SHA-256 fixed; a second run adds nothing", async () => {
    const made = await buildReleaseFiles(f.releaseId);
    expect(made.map((n) => n.split(".").pop()).sort()).toEqual(["csv", "parquet", "zip"]);
    expect(await buildReleaseFiles(f.releaseId)).toEqual([]);
    const files = await db.select().from(releaseFiles).where(eq(releaseFiles.releaseId, f.releaseId));
    expect(files).toHaveLength(3);
    for (const file of files) {
      const bytes = readFileSync(pathForKey(releaseFileKey(f.releaseId, ({ csv: 1, datapackage: 2, parquet: 3 } as const)[file.format as "csv"])));
      expect(bytes.length).toBe(file.sizeBytes);
      expect(sha256(bytes)).toBe(file.sha256);
    }
    // The release's public record lists them.
    const rel = await as(null).get(`/api/v1/releases/${f.releaseId}`);
    expect(rel.body.files).toHaveLength(3);
  });

  test("served with Content-Disposition and Repr-Digest; the bytes equal the stored file and an on-the-fly download", async () => {
    const [csv] = await db.select().from(releaseFiles).where(eq(releaseFiles.releaseId, f.releaseId)).then((r) => r.filter((x) => x.format === "csv"));
    const res = await raw(as(null).get(`/api/v1/releases/${f.releaseId}/files/${csv!.name}`));
    expect(res.status).toBe(200);
    expect(res.headers["content-disposition"]).toBe(`attachment; filename="${csv!.name}"`);
    // RFC 9530 Repr-Digest: sha-256 as base64 between colons.
    expect(res.headers["repr-digest"]).toBe(`sha-256=:${Buffer.from(csv!.sha256, "hex").toString("base64")}:`);
    expect(sha256(res.body)).toBe(csv!.sha256);
    const live = await as(null).get(`/api/v1/versions/${f.versionId}/download`);
    expect(res.body.toString()).toBe(live.text);
    expect((await as(null).get(`/api/v1/releases/${f.releaseId}/files/other.csv`)).status).toBe(404);
  });

  test("verify recomputes each checksum; a changed byte is caught and the file is no longer served whole", async () => {
    const ok = await as(null).get(`/api/v1/releases/${f.releaseId}/verify`);
    expect(ok.status).toBe(200);
    expect(ok.body.ok).toBe(true);
    expect(ok.body.items.every((i: { ok: boolean; actualSha256: string; expectedSha256: string }) => i.ok && i.actualSha256 === i.expectedSha256)).toBe(true);

    const [csv] = (await db.select().from(releaseFiles).where(eq(releaseFiles.releaseId, f.releaseId))).filter((x) => x.format === "csv");
    const path = pathForKey(releaseFileKey(f.releaseId, 1));
    const bytes = readFileSync(path);
    const tampered = Buffer.from(bytes);
    tampered[tampered.length - 3] = tampered[tampered.length - 3] === 0x31 ? 0x32 : 0x31;
    writeFileSync(path, tampered);
    try {
      const bad = await as(null).get(`/api/v1/releases/${f.releaseId}/verify`);
      expect(bad.body.ok).toBe(false);
      const item = bad.body.items.find((i: { name: string }) => i.name === csv!.name);
      expect(item).toMatchObject({ ok: false, expectedSha256: csv!.sha256, actualSha256: sha256(tampered) });
      expect(item.problem).toContain("SHA-256");
      // Same size, different bytes: the transfer is aborted at the end rather than completed.
      expect(bytes.length).toBeGreaterThan(2 * 65536);
      // Headers and the first chunks have left before the hash is known, so the transfer is cut short before its
      // last chunk: the client never gets the whole (bad) file.
      const served = await raw(request(testApp()).get(`/api/v1/releases/${f.releaseId}/files/${csv!.name}`)).then(
        (r) => ({ aborted: false, status: r.status, body: r.body as Buffer }),
        () => ({ aborted: true, status: 0, body: null }),
      );
      expect(served.aborted).toBe(true);
      // A different size is refused before any byte is sent.
      writeFileSync(path, Buffer.concat([bytes, Buffer.from("x")]));
      const refused = await as(null).get(`/api/v1/releases/${f.releaseId}/files/${csv!.name}`);
      expect(refused.status).toBe(409);
    } finally {
      writeFileSync(path, bytes);
    }
    expect((await as(null).get(`/api/v1/releases/${f.releaseId}/verify`)).body.ok).toBe(true);
  });

  test("after a retraction the data and files are for members only; the tombstone keeps the checksums", async () => {
    const [csv] = (await db.select().from(releaseFiles).where(eq(releaseFiles.releaseId, f.releaseId))).filter((x) => x.format === "csv");
    const title = (await pool.query(`select title from datasets where id = $1`, [f.datasetId])).rows[0].title as string;
    const listed = async () => (await as(null).get(`/api/v1/catalogue?q=${encodeURIComponent(title)}`)).body.items.some((i: { id: string }) => i.id === f.datasetId);
    expect(await listed()).toBe(true);
    const r = await as(f.users.curator.cookie).post(`/api/versions/${f.versionId}/retract`).send({ reason: "Anemometer calibration was wrong for the whole deployment" });
    expect(r.status).toBe(200);
    expect((await as(null).get(`/api/v1/versions/${f.versionId}/download`)).status).toBe(401);
    expect((await as(f.users.outsider.cookie).get(`/api/v1/versions/${f.versionId}/download`)).status).toBe(403);
    expect((await as(null).get(`/api/v1/releases/${f.releaseId}/files/${csv!.name}`)).status).toBe(401);
    expect((await as(f.users.contributor.cookie).get(`/api/v1/releases/${f.releaseId}/files/${csv!.name}`)).status).toBe(200);
    const tomb = await as(null).get(`/api/v1/releases/${f.releaseId}`);
    expect(tomb.body.retracted.reason).toContain("calibration");
    expect(tomb.body.files.map((x: { sha256: string }) => x.sha256)).toContain(csv!.sha256);
    // Gone from the catalogue at once.
    expect(await listed()).toBe(false);
  });
});
