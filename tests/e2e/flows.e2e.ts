import { createHash, randomUUID } from "node:crypto";
import { mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { expect, request, test, type APIRequestContext, type Page } from "@playwright/test";
import pg from "pg";
import { demoMooringColumnMap, demoMooringDefaults, mooringCsv } from "../../shared/demo/generate";
import { DEMO_PASSWORD, demo, flakyLink, shot, signIn } from "./helpers";
import { flagSql } from "../../server/db/record-flags";

/**
 * The four user flows of PRODUCT.md end to end in Chromium, against the full stack with the demo scenario, each step
 * through the pages a person would use: a contributor uploads a month of 1-minute data over a connection that drops,
 * maps and processes it, flags a stretch by hand and submits; a curator compares, rejects, the contributor rebuilds,
 * another curator approves and releases; a visitor finds the release and downloads it in three formats. Screenshots of
 * every step land in tests/artifacts/screenshots/flow-*.png.
 */

test.describe.configure({ mode: "serial" });

const baseURL = `http://127.0.0.1:${process.env.E2E_PORT}`;
const databaseUrl = `postgres://postgres@127.0.0.1:${process.env.TEST_PG_PORT ?? "55433"}/${process.env.E2E_DB}`;
const tag = randomUUID().slice(0, 6);
const platformName = `Merrow West ${tag}`;
const datasetTitle = `Merrow West ${tag} surface met and currents`;
const dir = "tests/artifacts/e2e-files";
const sha256 = (b: Buffer | string) => createHash("sha256").update(b).digest("hex");

/** State handed from one flow to the next (the flows run in order, as a person would live them). */
const s = { datasetId: "", platformId: "", uploadId: "", v2: "", v3: "", releaseId: "", monthSha: "" };

async function db<T = Record<string, unknown>>(text: string, params: unknown[] = []): Promise<T[]> {
  const c = new pg.Client({ connectionString: databaseUrl });
  await c.connect();
  try {
    return (await c.query(text, params)).rows as T[];
  } finally {
    await c.end();
  }
}

/** A signed-in API client (for the set-up that is not part of the flows: a platform and a first, released version). */
async function apiAs(email: string): Promise<APIRequestContext> {
  const ctx = await request.newContext({ baseURL, extraHTTPHeaders: { Origin: baseURL } });
  const r = await ctx.post("/api/auth/sign-in/email", { data: { email, password: DEMO_PASSWORD } });
  expect(r.status(), await r.text()).toBe(200);
  return ctx;
}

async function ok<T = Record<string, unknown>>(res: Promise<import("@playwright/test").APIResponse>, status = [200, 201]): Promise<T> {
  const r = await res;
  const body = await r.text();
  expect(status, `${r.url()} → ${r.status()} ${body}`).toContain(r.status());
  return (body ? JSON.parse(body) : {}) as T;
}

/** Plain tus 1.0.0 from Node: create, then one PATCH with the whole file. */
async function tusUpload(api: APIRequestContext, datasetId: string, name: string, data: Buffer): Promise<string> {
  const b64 = (x: string) => Buffer.from(x).toString("base64");
  const created = await api.post("/api/uploads", {
    headers: { "Tus-Resumable": "1.0.0", "Upload-Length": String(data.length), "Upload-Metadata": `datasetId ${b64(datasetId)},filename ${b64(name)},filetype ${b64("text/csv")}` },
  });
  expect(created.status(), await created.text()).toBe(201);
  const url = new URL(created.headers()["location"]!, baseURL).pathname;
  const patched = await api.patch(url, { headers: { "Tus-Resumable": "1.0.0", "Upload-Offset": "0", "Content-Type": "application/offset+octet-stream" }, data });
  expect(patched.status(), await patched.text()).toBe(204);
  return url.split("/").pop()!;
}

async function waitForState(api: APIRequestContext, versionId: string, states: string[], timeoutMs = 180_000) {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const v = await ok<{ state: string; progress?: { error?: unknown } }>(api.get(`/api/versions/${versionId}`));
    if (states.includes(v.state)) return v.state;
    if (v.state === "failed") throw new Error(`the build failed: ${JSON.stringify(v.progress?.error)}`);
    if (Date.now() > until) throw new Error(`version ${versionId} is still ${v.state}`);
    await new Promise((r) => setTimeout(r, 500));
  }
}

async function signOut(page: Page) {
  await page.getByRole("button", { name: "Sign out" }).click();
  await expect(page.getByRole("link", { name: "Sign in" }).first()).toBeVisible();
}

test.beforeAll(async () => {
  test.setTimeout(300_000);
  mkdirSync(dir, { recursive: true });
  // A new mooring in the demo project, so these flows never meet the other browser tests' data.
  const contributor = await apiAs(demo.contributor);
  const [project] = await db<{ id: string }>(`select id from projects where slug = 'merrow-shelf' or name like 'Merrow Shelf%' order by created_at limit 1`);
  const platform = await ok<{ id: string }>(contributor.post(`/api/projects/${project!.id}/platforms`, { data: { name: platformName, kind: "mooring" } }));
  const deployment = await ok<{ id: string }>(
    contributor.post(`/api/platforms/${platform.id}/deployments`, {
      data: { name: "MW-1", startTime: "2026-09-01T00:00:00Z", latitude: 41.25, longitude: -27.5, anemometerHeightM: 4 },
    }),
  );
  const dataset = await ok<{ id: string }>(
    contributor.post(`/api/projects/${project!.id}/datasets`, {
      data: { title: datasetTitle, deploymentId: deployment.id, description: "Invented mooring west of the Merrow shelf for the acceptance flows." },
    }),
  );
  s.datasetId = dataset.id;
  s.platformId = platform.id;

  // The previous release: ten days of September built by the real pipeline, approved and released by a curator.
  const september = Buffer.from([...mooringCsv({ ...demoMooringDefaults, start: Date.UTC(2026, 8, 20) / 1000, durationS: 10 * 86400, intervalS: 60 })].join(""));
  const uploadId = await tusUpload(contributor, dataset.id, "merrow-west-2026-09.csv", september);
  await ok(contributor.post(`/api/platforms/${platform.id}/column-maps`, { data: { map: demoMooringColumnMap(), note: "Logger export layout", uploadId } }));
  const v1 = await ok<{ id: string }>(contributor.post(`/api/datasets/${dataset.id}/versions`, { data: { uploadId, columnMap: demoMooringColumnMap(), mode: "replace" } }));
  await waitForState(contributor, v1.id, ["ready"]);
  await ok(contributor.post(`/api/versions/${v1.id}/submit`, { data: {} }));
  const curator = await apiAs(demo.curator2);
  await ok(curator.post(`/api/versions/${v1.id}/approve`, { data: {} }));
  await ok(curator.post(`/api/versions/${v1.id}/release`, { data: {} }));
  await Promise.all([contributor.dispose(), curator.dispose()]);
});

test("flow 1: a month of 1-minute data uploads through the page, survives a dropped connection and arrives whole", async ({ page }) => {
  test.setTimeout(240_000);
  const month = Buffer.from([...mooringCsv({ ...demoMooringDefaults, start: Date.UTC(2026, 9, 1) / 1000, durationS: 31 * 86400, intervalS: 60 })].join(""));
  const file = `${dir}/merrow-west-2026-10.csv`;
  writeFileSync(file, month);
  s.monthSha = sha256(readFileSync(file));
  expect(month.length).toBeGreaterThan(3 << 20);

  // The browser reaches the app through a link that drops the upload's connection half way and stays down for 6 s.
  const link = await flakyLink(baseURL, { cutAfterBytes: Math.floor(month.length * 0.45), downForMs: 6000 });
  try {
    await signIn(page, demo.contributor);
    await page.goto(`${link.url}/datasets/${s.datasetId}`);
    await expect(page.getByRole("heading", { name: datasetTitle })).toBeVisible();
    await expect(page.getByTestId("upload-dropzone")).toBeVisible();
    await shot(page, "flow-1-dataset-page");

    // Offsets the server reports when the client asks where to resume (tus HEAD).
    const resumedAt: number[] = [];
    const tusLog: string[] = [];
    page.on("response", (r) => {
      if (!r.url().includes("/api/uploads")) return;
      tusLog.push(`${r.request().method()} ${r.status()} offset=${r.headers()["upload-offset"] ?? "-"}`);
      if (r.request().method() === "HEAD" && r.status() === 200) resumedAt.push(Number(r.headers()["upload-offset"]));
    });
    page.on("requestfailed", (r) => {
      if (r.url().includes("/api/uploads")) tusLog.push(`${r.method()} failed: ${r.failure()?.errorText}`);
    });

    await page.locator(".uppy-Dashboard-input").first().setInputFiles(file);
    const cutAt = await link.cut;
    // While the link is down: no upload record before the file is whole.
    const [partial] = await db<{ n: number }>(`select count(*)::int as n from uploads where dataset_id = $1 and original_name = 'merrow-west-2026-10.csv'`, [s.datasetId]);
    expect(partial!.n).toBe(0);
    await shot(page, "flow-1-connection-lost");

    // The link comes back; the client asks the server how much it holds and sends only the rest (one upload, not two).
    const next = page.getByRole("link", { name: "Map columns and process" });
    await expect(next).toBeVisible({ timeout: 120_000 });
    console.log(`tus requests: ${tusLog.join(" | ")}`);
    expect(resumedAt.length, "the client asked the server where to resume").toBeGreaterThan(0);
    const offset = Math.max(...resumedAt);
    expect(offset, "the server kept the bytes sent before the drop").toBeGreaterThan(0);
    expect(offset).toBeLessThanOrEqual(cutAt);
    expect(tusLog.filter((l) => l.startsWith("POST 201")).length, "the upload was created once").toBe(1);
    // Only the missing part crossed the link again (plus what was in flight when it dropped).
    expect(link.uploaded()).toBeLessThan(month.length + cutAt);
    expect(link.uploaded()).toBeGreaterThanOrEqual(month.length);
    await shot(page, "flow-1-upload-complete");
    await expect(page.getByRole("row", { name: new RegExp(s.monthSha.slice(0, 12)) }).first()).toBeVisible();

    await next.click();
    await expect(page.getByRole("heading", { name: "Map columns: merrow-west-2026-10.csv" })).toBeVisible();
    await expect(page.getByTestId("upload-sha256")).toHaveText(s.monthSha);
    s.uploadId = page.url().split("/").pop()!;
    const [stored] = await db<{ sha256: string; size_bytes: string }>(`select sha256, size_bytes from uploads where id = $1`, [s.uploadId]);
    expect(stored!.sha256).toBe(s.monthSha);
    expect(Number(stored!.size_bytes)).toBe(month.length);
    await shot(page, "flow-1-checksum");
  } finally {
    await link.close();
  }
});

test("flow 2: the columns are mapped, processing shows progress, the QC report and plots show flags, a stretch is flagged by hand and the version submitted", async ({
  page,
}) => {
  test.setTimeout(300_000);
  expect(s.uploadId, "flow 1 left an upload").not.toBe("");
  await signIn(page, demo.contributor);
  await page.goto(`/datasets/${s.datasetId}/uploads/${s.uploadId}`);
  // The platform's saved map fills the editor: next month's file is one click.
  const editor = page.getByTestId("column-map-editor");
  await expect(editor).toContainText("The map is complete", { timeout: 60_000 });
  await expect(page.getByLabel("Variable of wspd")).toHaveValue("wind_speed");
  await page.getByLabel("Build").selectOption("append");
  await shot(page, "flow-2-column-map");
  await page.getByRole("button", { name: "Process this upload" }).click();
  await expect(page).toHaveURL(/\/versions\/[0-9a-f-]{36}$/);
  s.v2 = page.url().split("/").pop()!;
  const [v] = await db<{ number: number }>(`select number from versions where id = $1`, [s.v2]);
  expect(v!.number).toBe(2);

  // Progress while the worker builds, then the finished version with its QC summary.
  await expect(page.getByRole("progressbar", { name: "Processing progress" })).toBeVisible({ timeout: 30_000 });
  await shot(page, "flow-2-processing");
  const heading = page.getByRole("heading", { name: /Version 2/ });
  await expect(heading).toContainText(/ready/i, { timeout: 240_000 });
  await expect(page.getByRole("table", { name: "Statistics and QC flag counts per variable" })).toContainText("wind_speed");
  // The demo month has a storm: the automatic tests raise suspect or fail flags somewhere, counted per test.
  const raised = page.getByRole("table", { name: "Suspect and fail flags raised per test and variable" });
  await expect(raised.locator("tbody tr").first()).toBeVisible();
  await shot(page, "flow-2-ready");

  // The plots show flagged buckets and the QC report lists the flags.
  await page.goto(`/versions/${s.v2}/explore`);
  const wind = page.getByTestId("plot-panel-wind");
  await expect(wind).toBeVisible();
  await expect(wind).not.toHaveAttribute("data-buckets", "0");
  await shot(page, "flow-2-plots");
  await page.getByTestId("tab-qc").click();
  await expect(page.getByRole("table").first()).toBeVisible();
  await shot(page, "flow-2-qc-report");
  await page.getByTestId("tab-plots").click();
  await expect(wind).toBeVisible();

  // A stretch of the wind record is marked on the plot and flagged suspect by hand, with a reason.
  await page.getByTestId("mode-mark").check();
  const box = (await wind.locator(".u-over").boundingBox())!;
  await page.mouse.move(box.x + box.width * 0.52, box.y + box.height / 2);
  await page.mouse.down();
  await page.mouse.move(box.x + box.width * 0.55, box.y + box.height / 2, { steps: 8 });
  await page.mouse.up();
  const form = page.getByTestId("annotation-form");
  await expect(form).toBeVisible();
  await form.getByRole("textbox", { name: "Note" }).fill("Anemometer iced over during the cold spell");
  await page.getByTestId("flag-3").check();
  await page.getByTestId("annotation-reason").fill("Icing seen on the buoy camera; wind speed reads low");
  await shot(page, "flow-2-manual-flag");
  const t0 = Date.now();
  const [saved] = await Promise.all([
    page.waitForResponse((r) => r.request().method() === "POST" && r.url().endsWith("/annotations"), { timeout: 120_000 }),
    page.getByTestId("annotation-save").click(),
  ]);
  console.log(`manual flag saved: ${saved.status()} in ${Date.now() - t0} ms; sent ${saved.request().postData()?.slice(0, 400)}`);
  expect(saved.status(), await saved.text()).toBe(201);
  await expect(page.getByText(/now carry the manual flag/)).toBeVisible({ timeout: 30_000 });
  const [flagged] = await db<{ n: number }>(
    `select count(*)::int as n from records where dataset_id = $1 and valid_from <= 2 and (valid_to is null or valid_to > 2) and ${flagSql("wind_speed")} = 3`,
    [s.datasetId],
  );
  expect(flagged!.n).toBeGreaterThan(0);
  await shot(page, "flow-2-flagged");

  await page.goto(`/review/${s.v2}`);
  await page.getByLabel("Note for the reviewer (optional)").fill("October month from the west mooring; icing stretch flagged by hand.");
  await page.getByRole("button", { name: "Submit version 2" }).click();
  await expect(page.getByRole("heading", { name: /Version 2/ })).toContainText("in review");
  await shot(page, "flow-2-submitted");
});

const reason = "The October storm stretch needs its wind direction checked against the compass log; rebuild once the map notes it.";

test("flow 3: a curator compares and rejects with a reason, the contributor rebuilds and resubmits, a curator approves and releases; the mail arrives", async ({
  page,
}) => {
  test.setTimeout(300_000);
  expect(s.v2, "flow 2 left a version in review").not.toBe("");
  await signIn(page, demo.curator);
  await page.getByRole("link", { name: "Review queue" }).click();
  const queue = page.getByRole("table", { name: "Versions waiting for review" });
  await queue.getByRole("link", { name: datasetTitle, exact: true }).click();
  await expect(page.getByRole("heading", { name: /Version 2/ })).toBeVisible();
  // Compared with version 1: October is added, September unchanged.
  await expect(page.getByTestId("rows-added")).toHaveText(/^44[\s,\u202f\u00a0]?640$/); // 31 days × 1440 minutes
  await expect(page.getByRole("table", { name: "Statistics per variable, version 1 beside version 2" })).toBeVisible();
  await shot(page, "flow-3-compare");
  await page.getByRole("radio", { name: /Reject/ }).check();
  await page.getByLabel("Reason (required)").fill(reason);
  await page.getByRole("button", { name: "Reject" }).click();
  await expect(page.getByRole("heading", { name: /Version 2/ })).toContainText("rejected");
  await shot(page, "flow-3-rejected");
  await signOut(page);

  // The contributor reads the reason and builds version 3 from the same upload.
  await signIn(page, demo.contributor);
  await page.goto(`/review/${s.v2}`);
  await expect(page.getByRole("list", { name: "State history" })).toContainText(reason);
  await page.goto(`/datasets/${s.datasetId}/uploads/${s.uploadId}`);
  await expect(page.getByTestId("column-map-editor")).toContainText("The map is complete", { timeout: 60_000 });
  await page.getByLabel("Build").selectOption("append");
  await page.getByRole("button", { name: "Process this upload" }).click();
  await expect(page).toHaveURL(/\/versions\/[0-9a-f-]{36}$/);
  s.v3 = page.url().split("/").pop()!;
  await expect(page.getByRole("heading", { name: /Version 3/ })).toContainText(/ready/i, { timeout: 240_000 });
  await page.goto(`/review/${s.v3}`);
  await page.getByLabel("Note for the reviewer (optional)").fill("Rebuilt after the compass log check.");
  await page.getByRole("button", { name: "Submit version 3" }).click();
  await expect(page.getByRole("heading", { name: /Version 3/ })).toContainText("in review");
  await shot(page, "flow-3-resubmitted");
  await signOut(page);

  // Another curator approves and releases.
  await signIn(page, demo.curator);
  await page.goto(`/review/${s.v3}`);
  await page.getByRole("radio", { name: /Approve/ }).check();
  await page.getByRole("button", { name: "Approve" }).click();
  await expect(page.getByRole("heading", { name: /Version 3/ })).toContainText("approved");
  await page.getByRole("button", { name: "Release version 3" }).click();
  // The release page: the second release of the dataset, with its citation.
  await expect(page).toHaveURL(/\/releases\/[0-9a-f-]{36}$/, { timeout: 30_000 });
  await expect(page.getByRole("heading", { name: /Release 2 · version 3/ })).toContainText("released");
  await expect(page.getByText(new RegExp(`${datasetTitle}, version 3 \\[data set\\]`))).toBeVisible();
  await shot(page, "flow-3-released");
  s.releaseId = page.url().split("/").pop()!;
  const [rel] = await db<{ version_id: string }>(`select version_id from releases where id = $1`, [s.releaseId]);
  expect(rel!.version_id).toBe(s.v3);

  // The mail reached the fake SMTP box: the admin reads it on the Outgoing mail page.
  await signOut(page);
  await signIn(page, demo.admin);
  await page.goto("/admin/mail");
  await expect(page.getByText(new RegExp(`Rejected: ${datasetTitle}, version 2`)).first()).toBeVisible({ timeout: 20_000 });
  await expect(page.getByText(new RegExp(`Approved: ${datasetTitle}, version 3`)).first()).toBeVisible();
  await shot(page, "flow-3-outgoing-mail");
  const mails = await db<{ subject: string; text: string }>(`select subject, text from mail_messages where $1 = any("to") and subject like $2`, [demo.contributor, `%${datasetTitle}%`]);
  expect(mails.find((m) => m.subject.includes("Rejected"))?.text).toContain(reason);
});

test("flow 4: a visitor finds the release in the catalogue and downloads CSV, the data package and Parquet matching the checksums on the page", async ({ page }) => {
  test.setTimeout(300_000);
  expect(s.releaseId, "flow 3 left a release").not.toBe("");
  await page.goto("/");
  await page.getByLabel("Search released datasets").fill(`west ${tag}`);
  await page.getByRole("button", { name: "Search", exact: true }).click();
  const results = page.getByRole("table", { name: "Released datasets" });
  await expect(results.getByRole("row")).toHaveCount(2);
  await shot(page, "flow-4-catalogue");
  await results.getByRole("link", { name: datasetTitle }).click();
  await expect(page.getByRole("heading", { name: datasetTitle })).toBeVisible();

  // The release files are built after the release; the page lists them with their SHA-256 once they exist.
  const files = page.getByRole("table", { name: /Files of release/ });
  await expect(async () => {
    await page.reload();
    // CSV, data package and Parquet, each with its checksum, once all three are written.
    await expect(files.locator("tbody tr")).toHaveCount(3, { timeout: 2000 });
  }).toPass({ timeout: 240_000, intervals: [2000, 5000] });
  await shot(page, "flow-4-landing");

  const rows = await files.locator("tbody tr").all();
  const listed = await Promise.all(rows.map(async (r) => ({ name: (await r.locator("a").textContent())!.trim(), sha: (await r.locator("code").textContent())!.trim() })));
  const kinds = listed.map((f) => f.name.split(".").slice(1).join("."));
  expect(kinds).toEqual(expect.arrayContaining(["csv", "zip", "parquet"]));
  for (const f of listed) {
    const [download] = await Promise.all([page.waitForEvent("download"), files.getByRole("link", { name: f.name }).click()]);
    const bytes = readFileSync((await download.path())!);
    expect(sha256(bytes), `${f.name} matches the SHA-256 on the page`).toBe(f.sha);
    if (f.name.endsWith(".csv")) {
      const lines = bytes.toString("utf8").trim().split("\n");
      expect(lines.length - 1).toBe(10 * 1440 + 31 * 1440);
    }
  }
  await page.getByRole("button", { name: /Check the files|Verify|check/i }).first().click();
  await expect(page.getByText(/All \d+ files match/)).toBeVisible({ timeout: 60_000 });
  await shot(page, "flow-4-verified");
});
