import { createHash } from "node:crypto";
import { mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { expect, test } from "@playwright/test";
import { demoMooringDefaults, mooringCsv } from "../../shared/demo/generate";
import { demo, shot, signIn } from "./helpers";

/**
 * Flow 1 and 2 of PRODUCT.md in the browser: a data manager drops a generated logger file into the dataset page,
 * watches it upload (the link is throttled so progress is visible), sees the browser's early check, maps the columns
 * and saves the map for the platform.
 */
test("a contributor uploads a logger file through the dashboard, maps its columns and saves the map", async ({ page }) => {
  test.setTimeout(120_000);
  // ~6 MB of the invented demo mooring, with units written in two headers to exercise the suggestion.
  const dir = "tests/artifacts/e2e-files";
  mkdirSync(dir, { recursive: true });
  const text = [...mooringCsv({ ...demoMooringDefaults, intervalS: 1, durationS: 80_000 })].join("").replace(/^time,wspd,/, "time,wspd (m/s),");
  const file = `${dir}/merrow-north-logger.csv`;
  writeFileSync(file, text);
  const sha = createHash("sha256").update(readFileSync(file)).digest("hex");

  await signIn(page, demo.contributor);
  await page.getByRole("link", { name: "My projects" }).click();
  await page.getByRole("link", { name: "Merrow Shelf Observing Programme" }).first().click();
  await page.getByRole("link", { name: /Merrow North surface met and currents/ }).first().click();
  await expect(page.getByTestId("upload-dropzone")).toBeVisible();

  // Slow the link so the upload takes a few seconds and its progress can be seen.
  const cdp = await page.context().newCDPSession(page);
  await cdp.send("Network.emulateNetworkConditions", { offline: false, latency: 5, downloadThroughput: 50e6, uploadThroughput: 1.5e6 });
  await page.locator(".uppy-Dashboard-input").first().setInputFiles(file);
  const progress = page.locator(".uppy-StatusBar-statusPrimary");
  await expect(progress).toContainText(/Uploading/, { timeout: 15_000 });
  await expect(page.locator(".uppy-StatusBar-progress")).toBeVisible();
  await shot(page, "upload-in-progress");

  // The browser's early check runs on the same file while it uploads.
  const local = page.getByTestId("local-check");
  await expect(local).toContainText("comma-separated");
  await expect(local).toContainText("First QC pass in your browser", { timeout: 60_000 });

  const next = page.getByRole("link", { name: "Map columns and process" });
  await expect(next).toBeVisible({ timeout: 60_000 });
  await cdp.send("Network.emulateNetworkConditions", { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: -1 });
  await shot(page, "upload-done-local-check");
  // The uploads table shows the file with its SHA-256 (first characters; the whole digest for screen readers).
  await expect(page.getByRole("row", { name: new RegExp(sha.slice(0, 12)) }).first()).toBeVisible();

  await next.click();
  await expect(page.getByRole("heading", { name: /Map columns: merrow-north-logger.csv/ })).toBeVisible();
  await expect(page.getByTestId("upload-sha256")).toHaveText(sha);
  await expect(page.getByTestId("preview-table").locator("tbody tr")).toHaveCount(50);
  const editor = page.getByTestId("column-map-editor");
  // Suggested from the headers: the unit written in the header wins.
  await expect(page.getByLabel("Unit of wspd (m/s)")).toHaveValue("m s-1");
  await expect(page.getByLabel("Variable of airt")).toHaveValue("air_temperature");
  await expect(page.getByLabel("Unit of airt")).toHaveValue("degC");

  // Half a wind pair is explained, and saving is blocked until it is fixed.
  await page.getByLabel("Variable of wdir").selectOption("");
  await expect(editor.getByTestId("map-problems")).toContainText("Wind needs both speed and direction");
  await expect(page.getByRole("button", { name: "Save map" })).toBeDisabled();
  await shot(page, "upload-map-problem");
  await page.getByLabel("Variable of wdir").selectOption("wind_from_direction");
  await expect(editor).toContainText("The map is complete");

  await page.getByLabel("Note for this revision (optional)").fill("Logger firmware 4.2 export");
  await page.getByRole("button", { name: "Save map" }).click();
  await expect(page.getByText(/Column map saved as revision \d+ for this platform/)).toBeVisible();
  await expect(editor.getByText(/Saved maps of this platform/)).toBeVisible();
  await shot(page, "upload-map-saved");
});

test("an upload interrupted by a page reload resumes from the server's offset when the same file is picked again", async ({ page }) => {
  test.setTimeout(120_000);
  const dir = "tests/artifacts/e2e-files";
  mkdirSync(dir, { recursive: true });
  const file = `${dir}/merrow-south-logger.csv`;
  writeFileSync(file, [...mooringCsv({ ...demoMooringDefaults, seed: 7, intervalS: 1, durationS: 60_000 })].join(""));
  const sha = createHash("sha256").update(readFileSync(file)).digest("hex");

  await signIn(page, demo.contributor);
  await page.getByRole("link", { name: "My projects" }).click();
  await page.getByRole("link", { name: "Merrow Shelf Observing Programme" }).first().click();
  await page.getByRole("link", { name: /Merrow South surface met and currents/ }).first().click();
  await expect(page.getByTestId("upload-dropzone")).toBeVisible();
  const datasetUrl = page.url();
  const cdp = await page.context().newCDPSession(page);
  await cdp.send("Network.emulateNetworkConditions", { offline: false, latency: 5, downloadThroughput: 50e6, uploadThroughput: 0.8e6 });
  await page.locator(".uppy-Dashboard-input").first().setInputFiles(file);
  await expect(page.locator(".uppy-StatusBar-statusPrimary")).toContainText(/Uploading/, { timeout: 15_000 });
  await page.waitForTimeout(3000);
  await shot(page, "upload-before-reload");

  // The tab reloads mid-upload; the server keeps what arrived.
  await page.goto(datasetUrl);
  await cdp.send("Network.emulateNetworkConditions", { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: -1 });
  const tusCalls: { method: string; url: string; offset: string | null }[] = [];
  page.on("request", (r) => {
    if (r.url().includes("/api/uploads")) tusCalls.push({ method: r.method(), url: r.url(), offset: r.headers()["upload-offset"] ?? null });
  });
  await page.locator(".uppy-Dashboard-input").first().setInputFiles(file);
  await expect(page.getByRole("link", { name: "Map columns and process" })).toBeVisible({ timeout: 60_000 });
  // Resumed, not restarted: a HEAD to the earlier upload, then a PATCH from a non-zero offset, and no new POST.
  expect(tusCalls.some((c) => c.method === "HEAD")).toBe(true);
  const patch = tusCalls.find((c) => c.method === "PATCH");
  expect(Number(patch?.offset)).toBeGreaterThan(0);
  expect(tusCalls.some((c) => c.method === "POST")).toBe(false);
  await shot(page, "upload-resumed");
  await page.getByRole("link", { name: "Map columns and process" }).click();
  await expect(page.getByTestId("upload-sha256")).toHaveText(sha);
});
