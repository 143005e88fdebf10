import { expect, test } from "@playwright/test";
import pg from "pg";
import { seedCurationScenario, type CurationScenario } from "./curation-seed";
import { demo, shot, signIn } from "./helpers";

const databaseUrl = `postgres://postgres@127.0.0.1:${process.env.TEST_PG_PORT ?? "55433"}/${process.env.E2E_DB}`;
const reason = "Wind speed spike on 5 October 06:00–10:00 UTC is flagged fail but the anemometer log shows icing; flag it suspect and rebuild.";

let ids: CurationScenario;
test.beforeAll(async () => {
  process.env.E2E_PUBLIC_URL = `http://127.0.0.1:${process.env.E2E_PORT}`;
  ids = await seedCurationScenario(databaseUrl);
});

async function mailSubjects(to: string): Promise<{ subject: string; text: string }[]> {
  const c = new pg.Client({ connectionString: databaseUrl });
  await c.connect();
  try {
    return (await c.query(`select subject, text from mail_messages where $1 = any("to") order by received_at`, [to])).rows;
  } finally {
    await c.end();
  }
}

test("a curator rejects one version with a reason and approves another; the uploader sees both outcomes", async ({ page }) => {
  await signIn(page, demo.curator);
  await page.getByRole("link", { name: "Review queue" }).click();
  await expect(page.getByRole("heading", { name: "Review queue" })).toBeVisible();
  const queue = page.getByRole("table", { name: "Versions waiting for review" });
  await expect(queue.getByRole("row")).toHaveCount(3); // header + two versions
  await shot(page, "curation-queue");

  // Reject Merrow North v2: a reason is required.
  await queue.getByRole("link", { name: "Merrow North surface met and currents, 2026", exact: true }).click();
  await expect(page.getByRole("heading", { name: /Version 2/ })).toBeVisible();
  await expect(page.getByTestId("rows-added")).toHaveText("432");
  await expect(page.getByRole("table", { name: "QC flag counts per variable" })).toContainText("Wind speed");
  // A flagged stretch opens the plots around it, with its variable's plot brought into view.
  const stretchPlot = page.getByRole("table", { name: "Longest stretches of hours with suspect or failed values" }).getByRole("link", { name: /^Plot / }).first();
  await stretchPlot.click();
  await expect(page).toHaveURL(/\/explore\?from=[^&]+&to=[^&]+&variable=/);
  await expect(page.getByRole("heading", { name: /Explore version 2/ })).toBeVisible();
  const focused = new URL(page.url()).searchParams.get("variable")!;
  await expect(page.locator(`[data-variables~="${focused}"]`)).toBeInViewport();
  await shot(page, "curation-stretch-plots");
  await page.goBack();
  await expect(page.getByRole("heading", { name: /Version 2/ })).toBeVisible();
  await expect(page.getByRole("link", { name: "Plots, records and map" })).toHaveAttribute("href", `/versions/${ids.northV2}/explore`);
  await page.getByRole("radio", { name: /Reject/ }).check();
  await page.getByRole("button", { name: "Reject" }).click();
  await expect(page.getByText("Give a reason of at least 3 characters")).toBeVisible();
  await shot(page, "curation-reject-needs-reason");
  await page.getByLabel("Reason (required)").fill(reason);
  await page.getByRole("button", { name: "Reject" }).click();
  await expect(page.getByRole("heading", { name: /Version 2/ })).toContainText("rejected");
  await expect(page.getByRole("list", { name: "State history" })).toContainText(reason);
  await shot(page, "curation-rejected");

  // Approve Merrow South v1 from the queue.
  await page.getByRole("link", { name: "Review queue" }).click();
  await expect(queue.getByRole("row")).toHaveCount(2);
  await queue.getByRole("link", { name: "Merrow South surface met and currents, 2026", exact: true }).click();
  await expect(page.getByRole("heading", { name: /Version 1/ })).toBeVisible();
  await page.getByRole("radio", { name: /Approve/ }).check();
  await page.getByLabel("Note (optional)").fill("QC and coverage look right.");
  await page.getByRole("button", { name: "Approve" }).click();
  await expect(page.getByRole("heading", { name: /Version 1/ })).toContainText("approved");
  // Curators then see the release form on an approved version.
  await expect(page.getByRole("button", { name: "Release version 1" })).toBeVisible();
  await page.getByRole("link", { name: "Review queue" }).click();
  await expect(page.getByText("Nothing to review")).toBeVisible();

  // The uploader signs in and finds both outcomes in their notices and on the version pages.
  await page.getByRole("button", { name: "Sign out" }).click();
  await signIn(page, demo.contributor);
  const bell = page.getByTestId("notification-bell");
  await expect(bell.getByTestId("unread-count")).toHaveText("2");
  await bell.click();
  const notices = page.getByRole("region", { name: "Notices" });
  await expect(notices.getByRole("link", { name: /Rejected: Merrow North surface met and currents, 2026, version 2/ })).toBeVisible();
  await expect(notices.getByRole("link", { name: /Approved: Merrow South surface met and currents, 2026, version 1/ })).toBeVisible();
  await shot(page, "curation-uploader-notices");
  await notices.getByRole("link", { name: /Rejected:/ }).click();
  await expect(page).toHaveURL(new RegExp(`/review/${ids.northV2}$`));
  await expect(page.getByRole("heading", { name: /Version 2/ })).toContainText("rejected");
  await expect(page.getByRole("list", { name: "State history" })).toContainText(reason);
  await expect(bell.getByTestId("unread-count")).toHaveText("1");
  await shot(page, "curation-uploader-rejected");

  await bell.click();
  await page.getByRole("region", { name: "Notices" }).getByRole("link", { name: /Approved:/ }).click();
  await expect(page).toHaveURL(new RegExp(`/review/${ids.southV1}$`));
  await expect(page.getByRole("heading", { name: /Version 1/ })).toContainText("approved");
  await expect(bell.getByTestId("unread-count")).toHaveCount(0);

  // The same two decisions reached the uploader by e-mail, each linking to its version.
  await expect
    .poll(async () => (await mailSubjects(demo.contributor)).map((m) => m.subject).sort(), { timeout: 10_000 })
    .toEqual([
      "[Tauline] Approved: Merrow South surface met and currents, 2026, version 1",
      "[Tauline] Rejected: Merrow North surface met and currents, 2026, version 2",
    ]);
  const mails = await mailSubjects(demo.contributor);
  expect(mails.find((m) => m.subject.includes("Rejected"))!.text).toContain(`/review/${ids.northV2}`);
  expect(mails.find((m) => m.subject.includes("Rejected"))!.text).toContain(reason);
});
