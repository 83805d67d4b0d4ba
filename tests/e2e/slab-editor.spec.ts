import { expect, test } from "@playwright/test";
import { signInAs } from "./helpers";

test("a designer tunes the demo kit's slab live, places a piece by hand, and makes the plate", async ({ page }) => {
  await signInAs(page, "designer");
  await page.goto("/kits");
  await page
    .getByRole("row", { name: /Harbour Run token set/ })
    .getByRole("link", { name: "Slab editor →" })
    .click();

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

  // A mark engraved deeper than the slab allows is refused under its own field, saying by how much.
  await page.getByLabel(/^Number depth/).fill("0.8");
  await expect(page.getByTestId("field-note-mark_too_deep")).toContainText("0.20 mm less");
  await page.getByLabel(/^Number depth/).fill("0.4");
  await expect(page.getByTestId("field-note-mark_too_deep")).toHaveCount(0);

  // Drag piece 1 onto piece 2: an overlap, pointed at in the findings; one click back to automatic.
  // The map stays in sight while the options column scrolls (it is sticky beside the form).
  await expect(map).toBeInViewport();
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
  await expect(page.getByTestId("make-status")).toHaveAttribute("data-state", "done", { timeout: 30_000 });
  await expect(page.getByTestId("make-status")).toContainText("Ready: the plate is made and has passed its proof.");
  const href = await page.getByRole("link", { name: "Download 3MF" }).getAttribute("href");
  const res = await page.request.get(href!);
  expect(res.status()).toBe(200);
  expect(res.headers()["content-type"]).toBe("model/3mf");
  await page.goto("/plates");
  await expect(page.getByRole("row", { name: /Harbour Run token set/ }).first()).toContainText("slab editor");
});

test("disc outline, a text line and a QR code change the preview; the downloaded STL holds the slab and every piece", async ({ page }) => {
  test.setTimeout(90_000);
  await page.setViewportSize({ width: 1440, height: 1000 });
  await signInAs(page, "designer");
  await page.goto("/kits");
  await page
    .getByRole("row", { name: /Harbour Run token set/ })
    .getByRole("link", { name: "Slab editor →" })
    .click();
  await expect(page.getByTestId("plate-map")).toBeVisible({ timeout: 30_000 });
  await expect(page.getByTestId("preview-ms")).toContainText("frame");
  const canvas = page.getByTestId("view-3d");
  const before = await canvas.screenshot();

  // Each finished preview build has its own number: wait for the next one, not for different text.
  const built = async () => (await page.getByTestId("preview-ms").getAttribute("data-build")) ?? "";
  let last = await built();
  const changed = async () => {
    await expect.poll(built, { timeout: 10_000 }).not.toBe(last);
    last = await built();
  };
  await page.getByLabel("Bed").selectOption("300x300"); // a disc round the marks needs the room
  await changed();
  await page.getByLabel("Slab outline").selectOption("disc");
  await changed();
  await page.getByLabel("Text line 1").fill("HARBOUR RUN · SET {order}");
  await changed();
  await page.getByLabel("QR value").fill("https://shop.example/o/{order}");
  await changed();
  await expect(page.getByTestId("findings")).not.toContainText("error");
  await page.waitForTimeout(300);
  const after = await canvas.screenshot();
  expect(Buffer.compare(before, after)).not.toBe(0); // the canvas pixels differ
  await page.screenshot({ path: ".data/test-results/screenshots/slab-editor-1440.png" });
  await page.setViewportSize({ width: 1024, height: 900 });
  await page.waitForTimeout(300);
  await page.screenshot({ path: ".data/test-results/screenshots/slab-editor-1024.png", fullPage: true });
  await page.setViewportSize({ width: 1440, height: 1000 });

  // Drag a piece a little way (into free space on the disc), then undo and redo the move.
  const p = (await page.getByTestId("map-piece-1").boundingBox())!;
  await page.mouse.move(p.x + p.width / 2, p.y + p.height / 2);
  await page.mouse.down();
  await page.mouse.move(p.x + p.width / 2 + 3, p.y + p.height / 2 + 3, { steps: 4 });
  await page.mouse.up();
  await changed();
  await page.getByRole("button", { name: "Undo" }).click();
  await changed();
  await page.getByRole("button", { name: "Redo" }).click();
  await changed();
  // From the keyboard: a piece takes focus, Shift+arrow moves it 5 mm, Ctrl+Z takes the move back.
  const piece2 = page.getByTestId("map-piece-2");
  await piece2.focus();
  const at = (await piece2.boundingBox())!;
  await page.keyboard.press("Shift+ArrowUp");
  await changed();
  const mid = async () => {
    const b = (await piece2.boundingBox())!;
    return b.y + b.height / 2;
  };
  const atMid = at.y + at.height / 2;
  await expect.poll(mid).toBeLessThan(atMid - 2);
  await page.keyboard.press("Control+z");
  await changed();
  await expect.poll(async () => Math.abs((await mid()) - atMid)).toBeLessThan(1);
  // Per-line options: the second line embossed at 0.6 mm still builds.
  await page.getByLabel("Relief").nth(1).selectOption("emboss");
  await page
    .getByLabel(/^Height/)
    .first()
    .fill("0.6");
  await changed();
  await expect(page.getByTestId("findings")).not.toContainText("error");

  await page.getByRole("button", { name: "Make the plate" }).click();
  await expect(page.getByTestId("make-status")).toHaveAttribute("data-state", "done", { timeout: 30_000 });
  await expect(page.getByTestId("make-status")).toContainText("Ready: the plate is made and has passed its proof.");
  await expect(page.getByTestId("cautions")).toContainText("let the plate cool");
  await expect(page.getByTestId("toasts")).toContainText("Plate made");
  await expect(page.getByRole("table", { name: "Plates of this kit" }).getByTestId("plate-row").first()).toContainText("ready");
  const href = await page.getByRole("link", { name: "Download STL" }).getAttribute("href");
  const res = await page.request.get(href!);
  expect(res.headers()["content-disposition"]).toMatch(/harbour-run-token-set-\d{4}-\d{2}-\d{2}/);
  const stl = new Uint8Array(await res.body());
  const n = new DataView(stl.buffer, stl.byteOffset).getUint32(80, true);
  expect(stl.byteLength).toBe(84 + 50 * n); // a valid binary STL by the size rule
  const { importMesh } = await import("@/lib/geometry/import");
  const { loadKernel } = await import("@/lib/geometry/kernel");
  const back = importMesh(stl, await loadKernel(), { fileName: "plate.stl" });
  expect(back.bodies).toHaveLength(7); // the slab and the kit's six pieces
});
