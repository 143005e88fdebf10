import { readFileSync } from "node:fs";
import { randomUUID } from "node:crypto";
import { expect, test } from "@playwright/test";
import pg from "pg";
import { demoMooringDefaults, mooringChunks } from "../../shared/demo/generate";
import { shot } from "./helpers";
import { packFlags } from "../../server/db/record-flags";

const databaseUrl = `postgres://postgres@127.0.0.1:${process.env.TEST_PG_PORT ?? "55433"}/${process.env.E2E_DB}`;
const tag = randomUUID().slice(0, 6);
const title = `Merrow East buoy ${tag}, October 2026`;
let rows = 0;

/**
 * Test-only seeding: a released version of an invented mooring written straight into the e2e database (as the
 * pipeline and a curator's release would leave it). Never used by a production route.
 */
test.beforeAll(async () => {
  const c = new pg.Client({ connectionString: databaseUrl });
  await c.connect();
  try {
    const project = (await c.query(`select id, name from projects order by created_at limit 1`)).rows[0];
    const curator = (await c.query(`select id from "user" where email = 'curator@merrow.example'`)).rows[0];
    const platform = (await c.query(`insert into platforms (project_id, name, kind) values ($1, $2, 'mooring') returning id`, [project.id, `Merrow East ${tag}`])).rows[0].id;
    const deployment = (
      await c.query(`insert into deployments (platform_id, name, start_time, latitude, longitude) values ($1, 'ME-1', '2026-10-01T00:00:00Z', 48.75, -9.5) returning id`, [platform])
    ).rows[0].id;
    const dataset = (
      await c.query(`insert into datasets (project_id, deployment_id, title, description) values ($1, $2, $3, 'Invented test mooring east of the shelf break.') returning id`, [
        project.id,
        deployment,
        title,
      ])
    ).rows[0].id;
    const values: unknown[] = [];
    const passed = packFlags({ wind_speed: 1, air_temperature: 1 });
    const tuples: string[] = [];
    for (const ch of mooringChunks({ ...demoMooringDefaults, durationS: 2 * 86400, intervalS: 1800 })) {
      for (let k = 0; k < ch.n; k++) {
        const b = values.length;
        values.push(dataset, new Date(ch.time[k]! * 1000).toISOString(), ch.wind_speed[k], ch.air_temperature[k]! + 273.15, passed);
        tuples.push(`($${b + 1}, '', $${b + 2}, 1, $${b + 3}, $${b + 4}, $${b + 5})`);
      }
    }
    rows = tuples.length;
    await c.query(`select records_partition($1, 1)`, [dataset]); // a build would make version 1's partition
    await c.query(`insert into records (dataset_id, platform, time, valid_from, wind_speed, air_temperature, flags) values ${tuples.join(", ")}`, values);
    const summary = {
      rows,
      platforms: [],
      start: "2026-10-01T00:00:00.000Z",
      end: "2026-10-02T23:30:00.000Z",
      intervalS: 1800,
      gaps: [],
      gapCount: 0,
      coverage: 1,
      variables: [
        { variable: "wind_speed", unit: "m s-1", count: rows, min: 0, max: 20, mean: 7, std: 2, flags: [0, rows, 0, 0, 0] },
        { variable: "air_temperature", unit: "K", count: rows, min: 280, max: 290, mean: 285, std: 1, flags: [0, rows, 0, 0, 0] },
      ],
    };
    // As a release does it (database guards): an approved version, its release row, then the state, in one transaction.
    await c.query("begin");
    const version = (await c.query(`insert into versions (dataset_id, number, state, created_by, summary) values ($1, 1, 'approved', $2, $3) returning id`, [dataset, curator.id, summary])).rows[0].id;
    await c.query(
      `insert into releases (version_id, dataset_id, release_number, version_number, released_by, project_name, dataset_title, authors, citation, stable_url, licence)
       values ($1, $2, 1, 1, $3, $4, $5, '{Ada Quenby}', $6, 'http://127.0.0.1/releases/e2e', 'CC-BY-4.0')`,
      [version, dataset, curator.id, project.name, title, `Ada Quenby (2026). ${title}, version 1 [data set]. ${project.name}. Tauline release 1.`],
    );
    await c.query(`update versions set state = 'released', state_changed_at = now() where id = $1`, [version]);
    await c.query("commit");
  } finally {
    await c.end();
  }
});

test("a visitor finds a released dataset in the catalogue, reads its landing page and downloads it as CSV", async ({ page }) => {
  await page.goto("/");
  await page.getByLabel("Search released datasets").fill(`east buoy ${tag}`);
  await page.getByRole("button", { name: "Search", exact: true }).click();
  await expect(page).toHaveURL(new RegExp(`q=east\\+buoy\\+${tag}`));
  const results = page.getByRole("table", { name: "Released datasets" });
  await expect(results.getByRole("row")).toHaveCount(2); // header + the one match
  await shot(page, "catalogue-search");

  // The shared link reproduces the search, including an area that holds the buoy.
  await page.goto(`/?q=${tag}&bbox=-10,48,-9,49`);
  await expect(page.getByRole("table", { name: "Released datasets" }).getByRole("link", { name: title })).toBeVisible();
  await page.goto(`/?q=${tag}&bbox=0,0,1,1`);
  await expect(page.getByText("No released dataset matches")).toBeVisible();
  await page.goto(`/?q=${tag}`);
  await page.getByRole("link", { name: title }).click();

  await expect(page.getByRole("heading", { name: title })).toBeVisible();
  const variables = page.getByRole("table", { name: "Variables in this version" });
  await expect(variables).toContainText("air_temperature");
  await expect(variables).toContainText("K");
  await expect(page.getByText("Ada Quenby (2026).")).toBeVisible();
  await page.getByRole("tab", { name: "BibTeX" }).click();
  await expect(page.getByRole("tabpanel")).toContainText("@misc{");
  await shot(page, "catalogue-landing");

  const [download] = await Promise.all([page.waitForEvent("download"), page.getByRole("link", { name: "Download v1" }).click()]);
  expect(download.suggestedFilename()).toMatch(/^merrow-east-buoy-[a-f0-9]{6}-october-2026-v1\.csv$/);
  const text = readFileSync((await download.path())!, "utf8");
  const lines = text.trim().split("\n");
  expect(lines[0]).toBe("time,wind_speed,wind_speed_qc,air_temperature,air_temperature_qc");
  expect(lines).toHaveLength(rows + 1);
  expect(lines[1]).toMatch(/^2026-10-01T00:00:00Z,[0-9.]+,1,[0-9.]+,1$/);
});
