import { createHash, randomUUID } from "node:crypto";
import { mkdirSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { expect, test } from "@playwright/test";
import pg from "pg";
import { demoMooringColumnMap, demoMooringDefaults, mooringCsv } from "../../shared/demo/generate";
import { demo, shot, signIn } from "./helpers";

/**
 * Flow 2 in the browser: a built version of the demo mooring is explored, a stretch is marked on the wind plot,
 * flagged suspect with a reason, and the flag shows in the plot (flag marks on every bucket of the stretch) and in
 * the records table (the suspect badge beside each wind speed). The version is built by the stack's own worker from
 * an upload (file placed in storage as the upload endpoint leaves it, then POST /api/datasets/:id/versions).
 */
const db = () => new pg.Client({ connectionString: `postgres://postgres@127.0.0.1:${process.env.TEST_PG_PORT ?? "55433"}/${process.env.E2E_DB}` });

test("mark a stretch, flag it suspect with a reason, see it in plot and table", async ({ page }) => {
  const c = db();
  await c.connect();
  const ds = (await c.query(`select d.id, m.user_id from datasets d join memberships m on m.project_id = d.project_id join "user" u on u.id = m.user_id
                              where d.title like 'Merrow North%' and u.email = $1`, [demo.contributor])).rows[0];
  expect(ds, "the demo scenario has the Merrow North dataset").toBeTruthy();
  const text = [...mooringCsv({ ...demoMooringDefaults, start: Date.UTC(2026, 9, 1) / 1000, durationS: 3 * 86400, intervalS: 60, latitude: 41.62, longitude: -124.85 })].join("");
  const uploadId = randomUUID();
  const dir = join(`storage-e2e/${process.env.E2E_PORT}`, "uploads");
  mkdirSync(dir, { recursive: true });
  writeFileSync(join(dir, uploadId), text);
  await c.query(`insert into uploads (id, dataset_id, uploader_id, original_name, storage_key, size_bytes, sha256) values ($1, $2, $3, 'mn-2026-10-e2e.csv', $4, $5, $6)`, [
    uploadId,
    ds.id,
    ds.user_id,
    `uploads/${uploadId}`,
    Buffer.byteLength(text),
    createHash("sha256").update(text).digest("hex"),
  ]);
  await c.end();

  await signIn(page, demo.contributor);
  const created = await page.request.post(`/api/datasets/${ds.id}/versions`, { data: { uploadId, columnMap: demoMooringColumnMap(), mode: "replace" } });
  expect(created.status(), await created.text()).toBe(201);
  const versionId = (await created.json()).id as string;
  await expect
    .poll(async () => (await (await page.request.get(`/api/versions/${versionId}`)).json()).state, { timeout: 60_000, intervals: [500] })
    .toBe("ready");

  // Fail if anything tries to leave the machine (the CSP is self-only; the map ships its own coastline).
  const remote: string[] = [];
  page.on("request", (r) => {
    const u = new URL(r.url());
    if (!["127.0.0.1", "localhost"].includes(u.hostname) && !["data:", "blob:"].includes(u.protocol)) remote.push(r.url());
  });

  await page.goto(`/versions/${versionId}/explore`);
  const wind = page.getByTestId("plot-panel-wind");
  await expect(wind).toBeVisible();
  await expect(wind).not.toHaveAttribute("data-buckets", "0");
  await shot(page, "explore-plots");

  // Mark a stretch by dragging across the wind plot.
  await page.getByTestId("mode-mark").check();
  const over = wind.locator(".u-over");
  const box = (await over.boundingBox())!;
  await page.mouse.move(box.x + box.width * 0.42, box.y + box.height / 2);
  await page.mouse.down();
  await page.mouse.move(box.x + box.width * 0.46, box.y + box.height / 2, { steps: 8 });
  await page.mouse.up();
  const form = page.getByTestId("annotation-form");
  await expect(form).toBeVisible();
  await form.getByRole("textbox", { name: "Note" }).fill("Anemometer iced over; seen on the buoy camera");
  await page.getByTestId("flag-3").check();
  // A flag without a reason is refused, naming the field.
  await page.getByTestId("annotation-save").click();
  await expect(form.getByText(/Say why you flag this stretch/)).toBeVisible();
  await page.getByTestId("annotation-reason").fill("Icing on the sensor; values too low for the pressure gradient");
  await page.getByTestId("annotation-save").click();
  await expect(page.getByText(/now carry the manual flag/)).toBeVisible();
  await expect(page.getByTestId("annotation-rows")).toContainText("Icing on the sensor");

  // The plot: open the stretch itself; every bucket of wind speed inside it carries the suspect mark.
  await page.getByTestId("annotation-rows").getByRole("button", { name: "Show" }).click();
  await expect(page).toHaveURL(/from=/);
  const ann = (await (await page.request.get(`/api/datasets/${ds.id}/annotations`)).json()).items[0];
  // Two minutes inside each end, so no bucket reaches past the stretch.
  const inside = (iso: string, s: number) => new Date(Date.parse(iso) + s * 1000).toISOString();
  await page.goto(`/versions/${versionId}/explore?from=${inside(ann.from, 120)}&to=${inside(ann.to, -120)}`);
  await expect(wind).toBeVisible();
  await expect.poll(async () => Number(await wind.getAttribute("data-suspect-buckets"))).toBeGreaterThan(0);
  const buckets = Number(await wind.getAttribute("data-buckets"));
  const flagged = Number(await wind.getAttribute("data-suspect-buckets")) + Number(await wind.getAttribute("data-fail-buckets"));
  expect(flagged).toBe(buckets);
  await shot(page, "explore-plots-flagged");

  // The records table for the same window: suspect beside every wind speed.
  await page.getByTestId("show-numbers").click();
  const rows = page.getByTestId("record-row");
  await expect(rows.first()).toBeVisible();
  const n = Math.min(await rows.count(), 10);
  expect(n).toBeGreaterThan(0);
  for (let i = 0; i < n; i++) await expect(rows.nth(i).getByRole("cell").nth(1)).toContainText("suspect");
  await shot(page, "explore-records-flagged");

  // A value header sorts by that variable on the server: largest first, then smallest first.
  const speedHeader = page.getByRole("columnheader", { name: /^Wind speed/ });
  await speedHeader.getByRole("button").click();
  await expect(speedHeader).toHaveAttribute("aria-sort", "descending");
  await expect(page.getByText("Sorted by Wind speed, largest first")).toBeVisible();
  const speeds = async () =>
    (await rows.evaluateAll((els) => els.slice(0, 8).map((el) => el.querySelectorAll('[role="cell"]')[1]!.textContent!))).map((t) => Number(t.replace("−", "-").match(/-?[\d.]+/)![0]));
  await expect.poll(async () => { const v = await speeds(); return v.every((x, i) => i === 0 || x <= v[i - 1]!) && v.length > 1; }).toBe(true);
  const largest = (await speeds())[0]!;
  await speedHeader.getByRole("button").click();
  await expect(speedHeader).toHaveAttribute("aria-sort", "ascending");
  await expect.poll(async () => (await speeds())[0]!).toBeLessThan(largest);
  await shot(page, "explore-records-sorted");

  // The QC report's worst stretches open the plots on the stretch, with that variable's plot in view.
  await page.getByTestId("tab-qc").click();
  await page.getByRole("row", { name: /^Wind speed/ }).getByRole("button", { name: "Show in plots" }).first().click();
  await expect(page).toHaveURL(/variable=wind_speed/);
  await expect(page.locator('[data-variables~="wind_speed"]')).toBeInViewport();
  // A variable further down is scrolled to: its plot in view, the first plot out of it.
  await page.goto(`/versions/${versionId}/explore?variable=air_temperature`);
  await expect(page.locator('[data-variables~="air_temperature"]')).toBeInViewport();
  await expect(page.locator('[data-variables~="wind_speed"]')).not.toBeInViewport();

  await page.getByTestId("tab-map").click();
  await expect(page.getByTestId("map-land").first()).toBeVisible();
  await shot(page, "explore-map");
  expect(remote).toEqual([]);
});
