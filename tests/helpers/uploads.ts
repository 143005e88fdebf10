import { createHash, randomUUID } from "node:crypto";
import { mkdirSync, writeFileSync } from "node:fs";
import { dirname } from "node:path";
import type { AddressInfo } from "node:net";
import type { Server } from "node:http";
import * as tus from "tus-js-client";
import { createApp } from "../../server/app";
import { db } from "../../server/db/client";
import { uploadInspections, uploads } from "../../server/db/schema";
import { pathForKey, uploadKey } from "../../server/lib/file-store";
import { sniffDialect } from "../../shared/sniff";
import { as, type TestUser } from "./api";

/** The real app on a loopback port (tus clients need a listening server). */
export async function listenApp(): Promise<{ base: string; server: Server; close: () => Promise<void> }> {
  const server = createApp({ serveClient: false }).listen(0, "127.0.0.1");
  await new Promise<void>((r) => server.once("listening", () => r()));
  const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  return { base, server, close: () => new Promise((r) => server.close(() => r())) };
}

/** A mooring, deployment and dataset in the project, created through the API as `who`. */
export async function makeDataset(projectId: string, who: TestUser) {
  const c = as(who.cookie);
  const platform = await c.post(`/api/projects/${projectId}/platforms`).send({ name: `Mooring ${randomUUID().slice(0, 6)}`, kind: "mooring" });
  const deployment = await c.post(`/api/platforms/${platform.body.id}/deployments`).send({ name: "D-1", startTime: "2026-01-01T00:00:00Z" });
  const dataset = await c.post(`/api/projects/${projectId}/datasets`).send({ title: `Series ${randomUUID().slice(0, 6)}`, deploymentId: deployment.body.id });
  if (dataset.status !== 201) throw new Error(`dataset: ${dataset.status} ${JSON.stringify(dataset.body)}`);
  return { platformId: platform.body.id as string, deploymentId: deployment.body.id as string, datasetId: dataset.body.id as string };
}

export const sha256 = (b: Buffer | string) => createHash("sha256").update(b).digest("hex");

export interface TusOutcome {
  ok: boolean;
  url: string | null;
  status?: number;
  body?: string;
  error?: Error;
}

/**
 * Uploads `data` with tus-js-client as `cookie`. `stopAfterBytes` aborts once that much was acknowledged (the
 * returned url resumes it); `uploadUrl` resumes an earlier upload.
 */
export function tusUpload(
  base: string,
  cookie: string | null,
  data: Buffer,
  opts: { datasetId: string; filename?: string; chunkSize?: number; uploadUrl?: string; stopAfterBytes?: number; onChunk?: (sent: number) => void } = { datasetId: "" },
): Promise<TusOutcome> {
  return new Promise((resolve) => {
    let stopped = false;
    const up: tus.Upload = new tus.Upload(data, {
      endpoint: `${base}/api/uploads`,
      uploadUrl: opts.uploadUrl,
      headers: cookie ? { cookie } : {},
      metadata: { datasetId: opts.datasetId, filename: opts.filename ?? "logger-export.csv", filetype: "text/csv" },
      chunkSize: opts.chunkSize ?? 8 << 20,
      retryDelays: [],
      storeFingerprintForResuming: false,
      onChunkComplete(_size, sent) {
        opts.onChunk?.(sent);
        if (opts.stopAfterBytes !== undefined && sent >= opts.stopAfterBytes && !stopped) {
          stopped = true;
          void up.abort().then(() => resolve({ ok: false, url: up.url }));
        }
      },
      onSuccess: () => resolve({ ok: true, url: up.url }),
      onError: (error) => {
        if (stopped) return;
        const res = (error as tus.DetailedError).originalResponse;
        resolve({ ok: false, url: up.url, status: res?.getStatus(), body: res?.getBody(), error });
      },
    });
    up.start();
  });
}

/** The upload id at the end of a tus upload URL. */
export const idFromUrl = (url: string | null) => (url ?? "").split("/").pop()!;

/** Stores a recorded upload directly (for tests of the read routes), with its file under the upload key. */
export async function storeTestUpload(datasetId: string, uploaderId: string, text: string) {
  const id = randomUUID();
  const key = uploadKey(id);
  const path = pathForKey(key);
  mkdirSync(dirname(path), { recursive: true });
  writeFileSync(path, text);
  const buf = Buffer.from(text);
  await db.insert(uploads).values({ id, datasetId, uploaderId, originalName: "fixture.csv", storageKey: key, sizeBytes: buf.length, sha256: sha256(buf) });
  await db.insert(uploadInspections).values({ uploadId: id, encoding: "utf-8", dialect: sniffDialect(text).dialect, status: "ok", dataLineCount: 1, findings: [] });
  return id;
}
