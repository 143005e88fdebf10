import { expect, test } from "@playwright/test";
import { demo, shot, signIn } from "./helpers";

test("a contributor signs in, opens a platform and records a new deployment", async ({ page }) => {
  await signIn(page, demo.contributor);
  await page.getByRole("link", { name: "My projects" }).click();
  await page.getByRole("link", { name: "Merrow Shelf Observing Programme" }).first().click();
  await expect(page.getByRole("heading", { name: "Merrow Shelf Observing Programme" })).toBeVisible();
  await shot(page, "project");

  await page.getByRole("link", { name: "Merrow North", exact: true }).click();
  await expect(page.getByRole("heading", { name: "Merrow North", exact: true })).toBeVisible();
  await page.getByRole("button", { name: "New deployment" }).click();

  const form = page.getByRole("form", { name: "New deployment" });
  await form.getByLabel("Deployment name").fill("MN-2026-B");
  await form.getByLabel("Start (UTC)").fill("2026-10-01 06:00");
  await form.getByLabel("Latitude (° north)").fill("41.63");
  await form.getByLabel("Longitude (° east)").fill("-124.86");
  await form.getByLabel("Water depth (m)").fill("182");
  await form.getByLabel("Anemometer height (m)").fill("4.2");
  await form.getByLabel("Watch-circle radius (m)").fill("-5");
  await form.getByRole("button", { name: /save|create/i }).click();
  // The shared schema's message shows beside the field, and nothing is stored.
  await expect(form.getByText("Watch-circle radius must be greater than 0")).toBeVisible();
  await shot(page, "deployment-form-error");

  await form.getByLabel("Watch-circle radius (m)").fill("450");
  await form.getByRole("button", { name: /save|create/i }).click();
  const row = page.getByRole("row", { name: /MN-2026-B/ });
  await expect(row).toBeVisible();
  await expect(row).toContainText("2026-10-01 06:00");
  await shot(page, "deployment-created");

  // It is really stored: a reload shows it again.
  await page.reload();
  await expect(page.getByRole("row", { name: /MN-2026-B/ })).toBeVisible();
});

test("a visitor sees the public catalogue and is sent to sign in for members' pages", async ({ page }) => {
  await page.goto("/");
  await expect(page.getByRole("heading", { level: 1 })).toBeVisible();
  await shot(page, "catalogue-visitor");
  await page.goto("/projects");
  await expect(page).toHaveURL(/sign-in/);
});
