import { expect, test } from "@playwright/test";
import { signInAs } from "./helpers";


test("a designer tunes the demo kit's slab live, places a piece by hand, and makes the plate", async ({ page }) => {
  await signInAs(page, "designer");
  await page.goto("/kits");
  await page.getByRole("row", { name: /Harbour Run token set/ }).getByRole("link", { name: "Slab editor →" }).click();

  // The engine starts in the browser and draws the plate map: six numbered pieces.
  const map = page.getByTestId("plate-map");
  await expect(map).toBeVisible({ timeout: 30_000 });
  for (let n = 1; n <= 6; n++) await expect(page.getByTestId(`map-piece-${n}`)).toBeVisible();
  await expect(page.getByTestId("view-3d")).toBeVisible();
  await expect(page.getByTestId("estimates")).toContainText("6");

  // A change rebuilds without a page round trip and the checks follow it.
  await page.getByTestId("opt-gap").fill("0.15");
  await expect(page.getByTestId("findings")).toContainText("gap_out_of_range");
  await page.getByTestId("opt-gap").fill("0.25");
  await expect(page.getByTestId("findings")).not.toContainText("gap_out_of_range");

  // Drag piece 1 onto piece 2: an overlap, pointed at in the findings; one click back to automatic.
  const a = (await page.getByTestId("map-piece-1").boundingBox())!;
  const b = (await page.getByTestId("map-piece-2").boundingBox())!;
  await page.mouse.move(a.x + a.width / 2, a.y + a.height / 2);
  await page.mouse.down();
  await page.mouse.move(b.x + b.width / 2, b.y + b.height / 2, { steps: 8 });
  await page.mouse.up();
  await expect(page.getByTestId("findings")).toContainText("pieces_overlap");
  await expect(page.getByRole("button", { name: "Make the plate" })).toBeDisabled();
  await page.getByRole("button", { name: "Automatic layout" }).click();
  await expect(page.getByTestId("findings")).not.toContainText("pieces_overlap");

  // Make the plate: the worker builds it, the progress bar fills, the files download.
  await page.getByRole("button", { name: "Make the plate" }).click();
  await expect(page.getByTestId("make-status")).toContainText("done", { timeout: 30_000 });
  const href = await page.getByRole("link", { name: "Download 3MF" }).getAttribute("href");
  const res = await page.request.get(href!);
  expect(res.status()).toBe(200);
  expect(res.headers()["content-type"]).toBe("model/3mf");
  await page.goto("/plates");
  await expect(page.getByRole("row", { name: /Harbour Run token set/ }).first()).toContainText("slab editor");
});
