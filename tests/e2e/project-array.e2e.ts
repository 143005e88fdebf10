import { readFileSync } from "node:fs";
import { expect, test, type APIRequestContext } from "@playwright/test";
import { demoMooringColumnMap, mooringCsv } from "../../shared/demo/generate";
import { demo, shot, signIn } from "./helpers";

/**
 * The array diagnostics end to end: three moorings get a built version each through the API (tus upload, column
 * map, processing by the stack's real worker), the worker then computes the project's wind-stress curl, Ekman
 * pumping and Sverdrup transport, and the project page plots them and saves every step as CSV. All data is the
 * invented demo mooring series, six hours at 10-minute steps per mooring.
 */
const base = () => `http://127.0.0.1:${process.env.E2E_PORT}`;

async function ok<T>(res: Promise<import("@playwright/test").APIResponse>, what: string): Promise<T> {
  const r = await res;
  if (!r.ok()) throw new Error(`${what}: ${r.status()} ${await r.text()}`);
  return r.status() === 204 ? (undefined as T) : ((await r.json()) as T);
}

/** A mooring at (lat, lon) with one deployment and dataset, and a version built from six hours of demo data. */
async function mooringWithVersion(api: APIRequestContext, projectId: string, name: string, lat: number, lon: number, seed: number) {
  const headers = { Origin: base() };
  const platform = await ok<{ id: string }>(api.post(`/api/projects/${projectId}/platforms`, { headers, data: { name, kind: "mooring" } }), "platform");
  const deployment = await ok<{ id: string }>(
    api.post(`/api/platforms/${platform.id}/deployments`, {
      headers,
      data: { name: `${name} A`, startTime: "2026-10-01T00:00:00Z", latitude: lat, longitude: lon, anemometerHeightM: 4, currentMeterDepthM: 10 },
    }),
    "deployment",
  );
  const dataset = await ok<{ id: string }>(api.post(`/api/projects/${projectId}/datasets`, { headers, data: { title: `${name} surface met, October 2026`, deploymentId: deployment.id } }), "dataset");

  const body = Buffer.from([...mooringCsv({ seed, start: Date.UTC(2026, 9, 20) / 1000, durationS: 6 * 3600, intervalS: 600, latitude: lat, longitude: lon })].join(""));
  const b64 = (s: string) => Buffer.from(s).toString("base64");
  const created = await api.post("/api/uploads", {
    headers: { ...headers, "Tus-Resumable": "1.0.0", "Upload-Length": String(body.length), "Upload-Metadata": `datasetId ${b64(dataset.id)},filename ${b64(`${name}.csv`)}` },
  });
  expect(created.status()).toBe(201);
  const location = created.headers()["location"]!;
  const patched = await api.patch(location, {
    headers: { ...headers, "Tus-Resumable": "1.0.0", "Upload-Offset": "0", "Content-Type": "application/offset+octet-stream" },
    data: body,
  });
  expect(patched.status()).toBe(204);
  const uploadId = location.split("/").pop()!;
  const version = await ok<{ id: string }>(
    api.post(`/api/datasets/${dataset.id}/versions`, { headers, data: { uploadId, columnMap: demoMooringColumnMap(), mode: "replace" } }),
    "version",
  );
  await expect.poll(async () => (await ok<{ state: string }>(api.get(`/api/versions/${version.id}`), "version state")).state, { timeout: 60_000 }).toBe("ready");
}

test("three moorings' versions give the project its array diagnostics, plotted, with every step as CSV", async ({ page }) => {
  test.setTimeout(180_000);
  await signIn(page, demo.contributor);
  const api = page.request;
  const projects = await ok<{ items: { id: string; slug: string }[] }>(api.get("/api/projects"), "projects");
  const projectId = projects.items.find((p) => p.slug === "merrow-shelf")!.id;
  // A triangle of invented positions ~30 km apart, away from the demo's other moorings.
  await mooringWithVersion(api, projectId, "Array West", 41.3, -125.2, 5101);
  await mooringWithVersion(api, projectId, "Array East", 41.3, -124.8, 5102);
  await mooringWithVersion(api, projectId, "Array Apex", 41.6, -125.0, 5103);

  // The worker computes the array after each build; wait for the hours all three share.
  type Series = { time: number[]; curl: (number | null)[]; used: number[] };
  await expect
    .poll(async () => (await ok<Series>(api.get(`/api/projects/${projectId}/array-diagnostics`), "array")).curl.filter((x) => x !== null).length, { timeout: 60_000 })
    .toBeGreaterThanOrEqual(6);
  const series = await ok<Series>(api.get(`/api/projects/${projectId}/array-diagnostics`), "array");

  await page.getByRole("link", { name: "My projects" }).click();
  await page.getByRole("link", { name: "Merrow Shelf Observing Programme" }).first().click();
  await expect(page.getByRole("heading", { name: "Array diagnostics" })).toBeVisible();
  for (const id of ["array-curl", "array-pumping", "array-sverdrup"]) {
    const panel = page.getByTestId(`plot-panel-${id}`);
    await expect(panel).toBeVisible();
    expect(Number(await panel.getAttribute("data-buckets"))).toBe(series.curl.filter((x) => x !== null).length);
  }
  await page.getByTestId("plot-panel-array-curl").scrollIntoViewIfNeeded();
  await shot(page, "project-array-diagnostics");

  // The numbers behind the plots: every step, in SI units.
  const [download] = await Promise.all([page.waitForEvent("download"), page.getByRole("link", { name: "CSV of every step" }).click()]);
  const lines = readFileSync((await download.path())!, "utf8").trim().split("\n");
  expect(lines[0]).toBe("time_utc,platforms_used,wind_stress_curl_N_m-3,ekman_pumping_upward_m_s-1,sverdrup_transport_m2_s-1");
  expect(lines).toHaveLength(series.time.length + 1);
  const k = series.curl.findIndex((x) => x !== null);
  const cells = lines[k + 1]!.split(",");
  expect(cells[0]).toBe(new Date(series.time[k]! * 1000).toISOString());
  expect(Number(cells[1])).toBe(series.used[k]);
  expect(Number(cells[2])).toBe(series.curl[k]);
});
