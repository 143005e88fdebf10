import AxeBuilder from "@axe-core/playwright";
import { expect, test, type Page } from "@playwright/test";
import pg from "pg";
import { seedCurationScenario, type CurationScenario } from "./curation-seed";
import { demo, signIn } from "./helpers";

/**
 * WCAG 2.2 AA is the floor (PRODUCT.md, Identity): axe-core (npm @axe-core/playwright) checks the main pages of
 * each kind of user, in the light and the dark theme, against the WCAG 2.0–2.2 A and AA rules it automates.
 * Contrast, names, landmarks and focusable scroll areas are covered; focus order and meaning still need people.
 */
const databaseUrl = `postgres://postgres@127.0.0.1:${process.env.TEST_PG_PORT ?? "55433"}/${process.env.E2E_DB}`;
let ids: CurationScenario;
let where: { projectId: string; platformId: string; releaseId: string | null };

test.beforeAll(async () => {
  process.env.E2E_PUBLIC_URL = `http://127.0.0.1:${process.env.E2E_PORT}`;
  ids = await seedCurationScenario(databaseUrl);
  const c = new pg.Client({ connectionString: databaseUrl });
  await c.connect();
  try {
    const { rows } = await c.query(
      `select p.id as project_id, pl.id as platform_id, (select id from releases order by released_at limit 1) as release_id
         from projects p join platforms pl on pl.project_id = p.id and pl.name = 'Merrow North' where p.slug = 'merrow-shelf'`,
    );
    where = { projectId: rows[0].project_id, platformId: rows[0].platform_id, releaseId: rows[0].release_id };
  } finally {
    await c.end();
  }
});

/** The rules axe-core automates for WCAG 2.0, 2.1 and 2.2 at levels A and AA; a failure lists each rule and where. */
async function expectNoViolations(page: Page, what: string) {
  const r = await new AxeBuilder({ page }).withTags(["wcag2a", "wcag2aa", "wcag21a", "wcag21aa", "wcag22aa"]).analyze();
  const found = r.violations.map((v) => `${v.id} (${v.impact}): ${v.nodes.map((n) => n.target.join(" ")).slice(0, 3).join(" | ")}`);
  expect(found, `${what}: ${found.join("\n")}`).toEqual([]);
}

for (const colorScheme of ["light", "dark"] as const) {
  test.describe(`${colorScheme} theme`, () => {
    test.use({ colorScheme });

    test(`a visitor's pages pass the automated WCAG 2.2 AA checks (${colorScheme})`, async ({ page }) => {
      for (const path of ["/", "/sign-in", "/sign-up", "/forgot-password", ...(where.releaseId ? [`/releases/${where.releaseId}`] : [])]) {
        await page.goto(path);
        await expect(page.locator("main")).toBeVisible();
        await page.waitForLoadState("networkidle");
        await expectNoViolations(page, path);
      }
    });

    test(`a contributor's and a curator's pages pass the automated WCAG 2.2 AA checks (${colorScheme})`, async ({ page }) => {
      await signIn(page, demo.curator);
      const pages = [
        `/projects/${where.projectId}`,
        `/versions/${ids.southV1}`,
        `/versions/${ids.southV1}/explore`,
        `/versions/${ids.southV1}/explore?view=records`,
        `/versions/${ids.southV1}/explore?view=qc`,
        `/versions/${ids.southV1}/explore?view=map`,
        `/review`,
        `/review/${ids.northV2}`,
        `/api-docs`,
      ];
      for (const path of pages) {
        await page.goto(path);
        await page.waitForLoadState("networkidle");
        await expectNoViolations(page, path);
      }
      // The thresholds editor, open, with a variable's twelve months of climatology shown.
      await page.goto(`/platforms/${where.platformId}`);
      await page.getByRole("button", { name: /^QC thresholds of deployment / }).first().click();
      await page.getByRole("button", { name: /Air temperature monthly climatology$/ }).click();
      await expect(page.getByLabel("Air temperature: climatology minimum in January")).toBeVisible();
      await expectNoViolations(page, "thresholds editor");
    });

    test(`an administrator's pages pass the automated WCAG 2.2 AA checks (${colorScheme})`, async ({ page }) => {
      await signIn(page, demo.admin);
      for (const path of ["/admin/users", "/admin/mail"]) {
        await page.goto(path);
        await page.waitForLoadState("networkidle");
        await expectNoViolations(page, path);
      }
    });
  });
}
