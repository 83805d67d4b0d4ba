import { readFileSync } from "node:fs";
import { expect, test } from "@playwright/test";
import { signInAs } from "./helpers";

const creds = JSON.parse(readFileSync(process.env.SLAB_CREDENTIALS_FILE ?? ".data/demo-credentials.test.json", "utf8")) as {
  apiKey: string;
};

// A plate that failed says why where it is listed: its finding in words, not the bare state "failed".
test("a failed plate is listed with its reason in words", async ({ page, request }) => {
  test.setTimeout(90_000);
  await signInAs(page, "designer");
  await page.goto("/kits");
  const kitHref = await page
    .getByRole("row", { name: /Harbour Run token set/ })
    .getByRole("link", { name: "Slab editor →" })
    .getAttribute("href");
  const kitId = /\/kits\/([^/]+)\/slab/.exec(kitHref!)![1]!;
  // The test worker turns one triangle over between build and proof for this value (tamperForTest in
  // lib/jobs/build-thread.ts, honoured only under NODE_ENV=test): the plate fails its proof.
  const r = await request.post("/api/v1/plates", {
    headers: { authorization: `Bearer ${creds.apiKey}` },
    multipart: { kit: kitId, format: "json", reference: "ORD-WORDS-1", variables: JSON.stringify({ proof_tamper: "turn-triangle" }) },
  });
  expect(r.status()).toBe(422);
  await page.goto("/plates");
  const row = page.getByTestId("plate-row").filter({ hasText: "ORD-WORDS-1" }).first();
  await expect(row).toContainText("failed");
  await expect(row.getByTestId("plate-failure")).toContainText(/turned over/);
  await expect(row).not.toContainText("proof_failed");
});

// On a phone the plates list leaves out the columns a glance does not need (template, pieces, mass,
// from, by), so the status starts on screen and the files are a short scroll inside the table.
test("on a 390 px phone the plates list keeps when, what, status and files", async ({ page }) => {
  await page.setViewportSize({ width: 390, height: 844 });
  await signInAs(page, "designer");
  await page.goto("/plates");
  const table = page.getByRole("table", { name: "Plates", exact: true });
  await expect(table).toBeVisible();
  await expect(table.getByRole("columnheader", { name: "Status" })).toBeInViewport();
  await expect(table.getByRole("columnheader", { name: "Template" })).toBeHidden();
});
