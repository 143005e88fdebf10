import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { versionDetailSchema } from "@shared/schemas/versions";
import { stopSender } from "../../server/jobs/queue";
import { as, makeProjectWithRoles } from "../helpers/api";
import { countRows, makeMooringDataset, mooringMap, mooringText, startWorker, storeUpload, versionRows, waitForVersion, type WorkerHandle } from "../helpers/pipeline";

let worker: WorkerHandle;
let roles: Awaited<ReturnType<typeof makeProjectWithRoles>>;
beforeAll(async () => {
  roles = await makeProjectWithRoles();
  worker = await startWorker();
});
afterAll(async () => {
  await worker?.stop();
  await stopSender();
});

const day = Date.UTC(2026, 9, 1) / 1000;

describe("POST /api/datasets/:id/versions", () => {
  test("builds a version from an upload: records, summary and plot buckets", async () => {
    const { contributor } = roles.users;
    const { datasetId } = await makeMooringDataset(roles.projectId);
    const uploadId = await storeUpload(datasetId, contributor.id, mooringText({ start: day, durationS: 86400, intervalS: 60 }));
    const res = await as(contributor.cookie).post(`/api/datasets/${datasetId}/versions`).send({ uploadId, columnMap: mooringMap(), mode: "replace" });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body).toMatchObject({ number: 1, state: "processing" });
    await waitForVersion(res.body.id, ["ready", "failed"]);
    const detail = await as(contributor.cookie).get(`/api/versions/${res.body.id}`);
    expect(detail.status).toBe(200);
    const v = versionDetailSchema.parse(detail.body);
    expect(v.state, JSON.stringify(v.progress?.error)).toBe("ready");
    expect(v.summary!.rows).toBe(1440);
    expect(v.progress!.percent).toBe(100);
    expect(await countRows(datasetId)).toBe(1440);
    const rows = await versionRows(datasetId, 1, ["wind_speed", "wind_speed_qc", "air_temperature"]);
    expect(rows[0]!.t).toBe(day);
    // degC in the file → K in records (canonical unit).
    expect(Number(rows[0]!.air_temperature)).toBeGreaterThan(270);
  });
});
