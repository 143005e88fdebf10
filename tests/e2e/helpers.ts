import { expect, type Page } from "@playwright/test";

export const DEMO_PASSWORD = "tauline-demo-2026";
export const demo = {
  admin: "admin@merrow.example",
  contributor: "data@merrow.example",
  curator: "curator@merrow.example",
  curator2: "curator2@merrow.example",
};

/** Signs in through the sign-in page and waits for the signed-in shell. */
export async function signIn(page: Page, email: string, password = DEMO_PASSWORD) {
  await page.goto("/sign-in");
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await expect(page.getByRole("link", { name: "My projects" })).toBeVisible();
}

/** Saves a full-page screenshot as a test artifact. */
export async function shot(page: Page, name: string) {
  await page.screenshot({ path: `tests/artifacts/screenshots/${name}.png`, fullPage: true });
}
