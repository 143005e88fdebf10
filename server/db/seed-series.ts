import { createHash, randomUUID } from "node:crypto";
import { mkdirSync, writeFileSync } from "node:fs";
import path from "node:path";
import { eq } from "drizzle-orm";
import { demoFleetColumnMap, demoMooringColumnMap, fleetCsv, mooringCsv } from "@shared/demo/generate";
import type { Db } from "./client";
import { datasets, deployments, platforms, uploads, user, versions } from "./schema";
import { pathForKey, uploadKey } from "../lib/file-store";
import type { SessionUser } from "../middleware/require-session";

/**
 * Demo time series for the invented Merrow Shelf scenario, generated with code (shared/demo): one month of
 * 1-minute data per mooring and twenty days of half-hourly drifter fixes. Each becomes an upload and a
 * version built through the real pipeline. Merrow North's version is then reviewed by a second person and
 * released, so the public catalogue has something to show; Merrow South's waits in the review queue and
 * Merrow Inshore's is ready for its contributor to submit. With three moorings built, the project's array
 * diagnostics (wind-stress curl, Ekman pumping, Sverdrup transport) are computed as the worker would.
 * Datasets that already have versions are left alone, so a second start changes nothing.
 */
export async function seedDemoSeries(db: Db, log: (m: string) => void = () => {}) {
  const { createVersion } = await import("../services/versions");
  const { buildVersion } = await import("../pipeline/build");
  const { createColumnMap } = await import("../services/column-maps");
  const { submitVersion, approveVersion } = await import("../services/curation");
  const { releaseVersion } = await import("../services/releases");

  const person = async (email: string): Promise<SessionUser> => {
    const [u] = await db.select().from(user).where(eq(user.email, email));
    if (!u) throw new Error(`demo user ${email} is missing; run the demo seed first`);
    return { id: u.id, name: u.name, email: u.email, emailVerified: true, isAdmin: u.role === "admin" };
  };
  const contributor = await person("data@merrow.example");
  const curator = await person("curator@merrow.example");

  const rows = await db
    .select({ id: datasets.id, projectId: datasets.projectId, title: datasets.title, platformId: platforms.id, platform: platforms.name, kind: platforms.kind, lat: deployments.latitude, lon: deployments.longitude })
    .from(datasets)
    .innerJoin(deployments, eq(deployments.id, datasets.deploymentId))
    .innerJoin(platforms, eq(platforms.id, deployments.platformId))
    .orderBy(platforms.name);

  const builtMoorings = new Set<string>();
  for (const ds of rows) {
    const [existing] = await db.select({ id: versions.id }).from(versions).where(eq(versions.datasetId, ds.id)).limit(1);
    if (existing) continue;
    const plan =
      ds.kind === "drifter"
        ? {
            file: "merrow-drifters-2026-05.csv",
            csv: fleetCsv({ seed: 7301, start: Date.UTC(2026, 4, 10) / 1000, durationS: 20 * 86400, intervalS: 1800, count: 6, latitude: 41.4, longitude: -125.3 }),
            map: demoFleetColumnMap(),
          }
        : {
            file: `${ds.platform.toLowerCase().replace(/\s+/g, "-")}-2026-09.csv`,
            csv: mooringCsv({
              seed: ds.platform.includes("North") ? 4101 : ds.platform.includes("South") ? 4102 : 4103,
              start: Date.UTC(2026, 8, 1) / 1000,
              durationS: 30 * 86400,
              intervalS: 60,
              latitude: ds.lat ?? 41.4,
              longitude: ds.lon ?? -124.9,
            }),
            map: demoMooringColumnMap(),
          };

    // The file lands where a finished resumable upload would, under a key built from a server id.
    const uploadId = randomUUID();
    const key = uploadKey(uploadId);
    const file = pathForKey(key);
    mkdirSync(path.dirname(file), { recursive: true });
    const text = [...plan.csv].join("");
    writeFileSync(file, text);
    const bytes = Buffer.byteLength(text);
    const sha256 = createHash("sha256").update(text).digest("hex");
    await db.insert(uploads).values({ id: uploadId, datasetId: ds.id, uploaderId: contributor.id, originalName: plan.file, storageKey: key, sizeBytes: bytes, sha256 });

    if (ds.kind === "mooring") await createColumnMap(contributor, ds.platformId, { map: plan.map, note: "Demo logger layout", uploadId });
    const created = await createVersion(contributor, ds.id, { uploadId, columnMap: plan.map, mode: "replace" });
    // Build now, in this process, so the demo is complete when the app opens; the queued job then finds nothing to do.
    await buildVersion(created.id);
    const [v] = await db.select({ state: versions.state }).from(versions).where(eq(versions.id, created.id));
    log(`demo series: ${ds.title} → version ${created.number} ${v?.state}`);
    if (v?.state !== "ready") continue;

    if (ds.kind === "mooring") builtMoorings.add(ds.projectId);
    if (ds.kind === "mooring" && !ds.platform.includes("Inshore")) {
      await submitVersion(contributor, created.id, { note: "September 2026 from the logger download; anemometer cleaned on the 12th." });
      if (ds.platform.includes("North")) {
        await approveVersion(curator, created.id, { reason: "QC report and plots look sound; the storm on the 13th is real." });
        await releaseVersion(curator, created.id, { notes: "First release of Merrow North surface data (invented demo data)." });
        log(`demo series: ${ds.title} → released`);
      }
    }
  }
  // Built here rather than queued, so the project page shows the array's series when the app opens.
  if (builtMoorings.size) {
    const { computeArrayDiagnostics } = await import("../jobs/array-diagnostics.job");
    for (const projectId of builtMoorings) {
      const r = await computeArrayDiagnostics(projectId);
      log(`demo series: array diagnostics → ${r.steps} hourly steps${r.note ? ` (${r.note})` : ""}`);
    }
  }
}
