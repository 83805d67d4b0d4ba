import { mkdirSync } from "node:fs";
import AxeBuilder from "@axe-core/playwright";
import { expect, test, type Page } from "@playwright/test";
import { signInAs } from "./helpers";

// A designer's day in the slab editor, on a kit of their own (the demo kit stays as other specs expect it).

const SIZES = [
  [1440, 900],
  [1024, 768],
  [390, 844],
] as const;

async function shots(page: Page, name: string, sizes: readonly (readonly [number, number])[] = SIZES) {
  mkdirSync(".data/shots", { recursive: true });
  for (const [width, height] of sizes) {
    await page.setViewportSize({ width, height });
    await page.waitForTimeout(400);
    await page.screenshot({ path: `.data/shots/${name}-${width}.png`, fullPage: true });
  }
  await page.setViewportSize({ width: 1440, height: 900 });
}

/** A new kit of the demo parts, three tiles and two pawns; its slab editor opened. Returns the kit's id. */
async function newKit(page: Page, name: string): Promise<string> {
  await page.goto("/kits/new");
  const kit = page.getByRole("form", { name: "Kit" });
  await kit.getByLabel("Name").fill(name);
  await kit.getByLabel("Part of line 1").selectOption({ label: "Harbour tile" });
  await kit.getByLabel("Quantity of line 1").fill("3");
  await kit.getByRole("button", { name: "Add a part" }).click();
  await kit.getByLabel("Part of line 2").selectOption({ label: "Beacon pawn" });
  await kit.getByLabel("Quantity of line 2").fill("2");
  await kit.getByRole("button", { name: "Save kit" }).click();
  await expect(page).toHaveURL(/\/kits$/);
  await page
    .getByRole("row", { name: new RegExp(name) })
    .getByRole("link", { name: "Slab editor →" })
    .click();
  await expect(page.getByTestId("plate-map")).toBeVisible({ timeout: 30_000 });
  return /\/kits\/([^/]+)\/slab/.exec(page.url())![1]!;
}

/** Axe's serious and critical violations on the page, each with where it is (none is the aim). */
async function axeProblems(page: Page): Promise<string[]> {
  const axe = await new AxeBuilder({ page }).analyze();
  return axe.violations
    .filter((v) => v.impact === "serious" || v.impact === "critical")
    .map((v) => `${v.impact} ${v.id} (${v.nodes.length}×: ${v.nodes[0]?.target.join(" ")})`);
}

/** The kit's settings have been saved once more than `before` times. */
async function keptAfter(page: Page, before: number) {
  await expect
    .poll(async () => Number(await page.getByTestId("kept").getAttribute("data-saves")), { timeout: 10_000 })
    .toBeGreaterThan(before);
  await expect(page.getByTestId("kept")).toHaveAttribute("data-state", "kept");
  return Number(await page.getByTestId("kept").getAttribute("data-saves"));
}

test("the kit keeps its slab: options, hand layout and undo survive a reload; the selection follows the piece", async ({ page }) => {
  test.setTimeout(150_000);
  await page.setViewportSize({ width: 1440, height: 900 });
  await signInAs(page, "designer");
  const name = `Day kit ${Date.now()}`;
  const kitId = await newKit(page, name);

  // Defaults at first: no QR.
  await expect(page.getByLabel("QR value")).toHaveValue("");
  let saves = 0;
  await page.getByTestId("opt-gap").fill("0.25");
  saves = await keptAfter(page, saves);
  await page.getByLabel("QR value").fill("https://shop.example/o/{order}");
  saves = await keptAfter(page, saves);

  // Undo takes the QR code back out, then the gap; redo puts the gap back. Each is kept with the kit.
  await page.getByRole("button", { name: "Undo" }).click();
  await expect(page.getByLabel("QR value")).toHaveValue("");
  await page.getByRole("button", { name: "Undo" }).click();
  await expect(page.getByTestId("opt-gap")).toHaveValue("0.2");
  await page.getByRole("button", { name: "Redo" }).click();
  await expect(page.getByTestId("opt-gap")).toHaveValue("0.25");
  await page.getByRole("button", { name: "Redo" }).click();
  await expect(page.getByLabel("QR value")).toHaveValue("https://shop.example/o/{order}");
  // Back where it was saved: nothing new to keep.
  await expect(page.getByTestId("kept")).toHaveAttribute("data-state", "kept");

  // Pick the first piece, then drag it to the far right of the map: its number changes with its place,
  // the selection bar and the 3D view's highlight stay with the same piece.
  const first = page.getByTestId("map-piece-1");
  const slot = await first.getAttribute("data-slot");
  const label = (await first.getAttribute("aria-label"))!;
  const part = /^Piece 1, ([^:]+)/.exec(label)![1]!;
  const a = (await first.boundingBox())!;
  const map = (await page.getByTestId("plate-map").boundingBox())!;
  await page.mouse.move(a.x + a.width / 2, a.y + a.height / 2);
  await page.mouse.down();
  await page.mouse.move(map.x + map.width - 12, map.y + map.height - 12, { steps: 10 });
  await page.mouse.up();
  const moved = page.locator(`[data-testid^="map-piece-"][data-slot="${slot}"]`);
  await expect(moved).toBeVisible();
  await expect.poll(async () => (await moved.getAttribute("data-testid")) !== "map-piece-1", { timeout: 10_000 }).toBe(true);
  const number = (await moved.getAttribute("data-testid"))!.replace("map-piece-", "");
  await expect(page.getByTestId("selection")).toHaveText(`Piece ${number} · ${part}`);
  await expect(page.getByTestId("view-card")).toHaveAttribute("data-highlight", `${slot}:${part}`);
  await keptAfter(page, saves);
  const placed = (await moved.boundingBox())!;
  // The view's own button is never under the banner.
  await page.getByRole("button", { name: "Top view" }).click();
  await expect(page.getByRole("button", { name: "Angled view" })).toHaveAttribute("aria-pressed", "true");
  await shots(page, "editor");

  // Reload: the kit opens where it was left: the gap, the QR code and the piece placed by hand.
  await page.reload();
  await expect(page.getByTestId("plate-map")).toBeVisible({ timeout: 30_000 });
  await expect(page.getByTestId("opt-gap")).toHaveValue("0.25");
  await expect(page.getByLabel("QR value")).toHaveValue("https://shop.example/o/{order}");
  const again = page.locator(`[data-testid^="map-piece-"][data-slot="${slot}"]`);
  await expect.poll(async () => Math.abs((await again.boundingBox())!.x - placed.x), { timeout: 15_000 }).toBeLessThan(2);
  await expect(page.getByRole("button", { name: "Automatic layout" })).toBeEnabled();

  // The developer timings are behind a disclosure; the stale banner does not cover the view's button.
  await expect(page.getByTestId("preview-ms")).toBeHidden();
  await page.getByText("Engine timings").click();
  await expect(page.getByTestId("preview-ms")).toContainText("Built in");

  // Straight to the editor from elsewhere: the same slab.
  await page.goto("/plates");
  await page.goto(`/kits/${kitId}/slab`);
  await expect(page.getByTestId("opt-gap")).toHaveValue("0.25");
});

test("a kit that never fits the bed shows the layout that was tried, what overflows outlined, and why", async ({ page }) => {
  test.setTimeout(120_000);
  await page.setViewportSize({ width: 1440, height: 900 });
  await signInAs(page, "designer");
  await newKit(page, `Tight kit ${Date.now()}`);
  await page.getByLabel("Bed", { exact: true }).selectOption("custom");
  await page.getByLabel(/^Bed width/).fill("70");
  await page.getByLabel(/^Bed depth/).fill("60");
  await expect(page.getByTestId("tried-map")).toBeVisible({ timeout: 15_000 });
  await keptAfter(page, 0);

  // Opened afresh, it has never fitted: no endless "Building the preview…".
  await page.reload();
  await expect(page.getByTestId("tried-map")).toBeVisible({ timeout: 30_000 });
  await expect(page.getByTestId("view-message")).toContainText("do not fit the bed");
  await expect(page.getByText("Building the preview…")).toHaveCount(0);
  expect(await page.getByTestId("tried-overflow").count()).toBeGreaterThan(0);
  await expect(page.getByTestId("tried-finding")).toContainText("70 × 60 mm bed");
  await expect(page.getByTestId("tried-finding")).toContainText("reach past the bed");
  await expect(page.getByTestId("findings")).toContainText("does_not_fit");
  await shots(page, "tried");

  // A bed that holds it: the plate map and the 3D view are back.
  await page.getByLabel("Bed", { exact: true }).selectOption("220x220");
  await expect(page.getByTestId("plate-map")).toBeVisible({ timeout: 15_000 });
  await expect(page.getByTestId("view-3d")).toBeVisible();
});

test("a template's defaults and the sample values typed when saving reach the preview, and the plate is made", async ({ page }) => {
  test.setTimeout(150_000);
  await page.setViewportSize({ width: 1440, height: 900 });
  await signInAs(page, "designer");
  const kitId = await newKit(page, `Shop kit ${Date.now()}`);
  await page.getByLabel("Text line 1").fill("{shop}");
  await page.getByLabel("Text line 2").fill("ORDER {order}");

  const name = `Shop label ${Date.now()}`;
  await page.getByRole("button", { name: "Save as a template…" }).click();
  const save = page.getByRole("form", { name: "Save as a template" });
  await save.getByLabel("Template name").fill(name);
  await save.getByLabel("Default for {shop}").fill("Harbour Crafts");
  await save.getByLabel("Sample for {shop}").fill("");
  await save.getByLabel("Sample for {order}").fill("31337");
  await save.getByRole("button", { name: "Save the template" }).click();
  await expect(page.getByTestId("toasts")).toContainText(`“${name}” saved as version 1`);

  // The sample typed in the form is in the Values; an emptied value falls back to the template's default.
  await expect(page.getByLabel("{order}", { exact: true })).toHaveValue("31337");
  await page.getByLabel("{shop}", { exact: true }).fill("");
  await expect(page.getByLabel("{shop}", { exact: true })).toHaveAttribute("placeholder", /Harbour Crafts/);
  await expect(page.getByTestId("findings")).not.toContainText("unfilled_placeholder");
  await expect(page.getByTestId("values-missing")).toHaveCount(0);
  await page.getByRole("button", { name: "Make the plate" }).click();
  await expect(page.getByTestId("make-status")).toHaveAttribute("data-state", "done", { timeout: 40_000 });
  await expect(page.getByTestId("toasts")).not.toContainText("no default");

  // Opened from the template: its default fills {shop}.
  const templateId = await page.getByLabel("Apply a template").inputValue();
  await page.goto(`/kits/${kitId}/slab?template=${templateId}`);
  await expect(page.getByTestId("plate-map")).toBeVisible({ timeout: 30_000 });
  await expect(page.getByLabel("{shop}", { exact: true })).toHaveValue("Harbour Crafts");
  await expect(page.getByLabel("{order}", { exact: true })).toHaveValue("31337");
  await expect(page.getByTestId("findings")).not.toContainText("unfilled_placeholder");
});

test("a customer's long name: the line shrinks with a warning at it; refused instead, the map says it is not updated and why", async ({
  page,
}) => {
  test.setTimeout(150_000);
  await page.setViewportSize({ width: 1440, height: 900 });
  await signInAs(page, "designer");
  await newKit(page, `Long name kit ${Date.now()}`);
  // The editor as it opens passes axe: no serious or critical violation (the plate map holds its
  // pieces' buttons as a group, not inside an image).
  expect(await axeProblems(page)).toEqual([]);
  // The cost is money, in euro.
  await expect(page.getByTestId("estimates")).toContainText(/Cost\s*€\d+\.\d\d/);

  // The demo shop's thank-you template: its second line has 70 mm of room for the name.
  const demo = await page.locator("option", { hasText: "Marrowby thank-you" }).first().getAttribute("value");
  await page.getByLabel("Apply a template").selectOption(demo!);
  await expect(page.getByLabel("Text line 2")).toHaveValue("Thank you, {customer}!");
  const built = Number(await page.getByTestId("preview-ms").getAttribute("data-build"));
  await page.getByLabel("{customer}", { exact: true }).fill("Maximilian Featherstonehaugh");
  await expect
    .poll(async () => Number(await page.getByTestId("preview-ms").getAttribute("data-build")), { timeout: 15_000 })
    .toBeGreaterThan(built);

  // Shrunk (the default): a warning at the line's cap height, the plate still current and makeable.
  const capHeight = page.getByLabel(/^Cap height/).nth(1);
  await expect(capHeight).toHaveAccessibleDescription(/Text line 2 .* was reduced from 4 mm to [\d.]+ mm cap height to fit/, {
    timeout: 15_000,
  });
  await expect(page.getByTestId("findings")).toContainText("text_shrunk");
  await expect(page.getByTestId("map-card")).toHaveAttribute("data-state", "current");
  await expect(page.getByRole("button", { name: "Make the plate" })).toBeEnabled();
  await shots(page, "long-name-shrunk", [SIZES[0], SIZES[2]]);

  // Refuse the plate instead: the map is the last plate that built, greyed, saying why the new one is not.
  const fit = page.getByLabel("If the line is too long").nth(1);
  await expect(fit).toHaveValue("shrink");
  await fit.selectOption({ label: "Refuse the plate" });
  const banner = page.getByTestId("map-not-updated");
  await expect(banner).toBeVisible({ timeout: 15_000 });
  await expect(banner).toContainText("Not updated");
  await expect(banner).toContainText("The map shows the last plate that could be built");
  await expect(banner).toContainText(/Text line 2 .* is [\d.]+ mm too long/);
  await expect(page.getByTestId("map-card")).toHaveAttribute("data-state", "not-updated");
  // The last plate's pieces are still on the map (a refused line builds no layout and no pieces).
  expect(await page.locator('[data-testid^="map-piece-"]').count()).toBe(5);
  await expect(page.getByTestId("plate-map")).toHaveAccessibleName(/^Plate map \(not updated/);
  // The refusal at its field: the cap height, since a smaller size that prints would fit.
  await expect(capHeight).toHaveAccessibleDescription(/Text line 2 .* too long: at 4 mm .*it fits at [\d.]+ mm/);
  await expect(page.getByTestId("findings")).toContainText("text_too_long");
  await expect(page.getByTestId("findings")).not.toContainText("text_shrunk");
  // No plate: the button is off and says what stops it.
  await expect(page.getByRole("button", { name: "Make the plate" })).toBeDisabled();
  await expect(page.getByTestId("make-refusal")).toContainText(/Not until this is fixed: Text line 2 .* too long/);
  expect(await axeProblems(page)).toEqual([]);
  await shots(page, "long-name-refused", [SIZES[0], SIZES[2]]);

  // A shorter name: current again, and the plate can be made.
  await page.getByLabel("{customer}", { exact: true }).fill("Max");
  await expect(page.getByTestId("map-card")).toHaveAttribute("data-state", "current", { timeout: 15_000 });
  await expect(banner).toHaveCount(0);
  await expect(page.getByRole("button", { name: "Make the plate" })).toBeEnabled();
});

test("a viewer sees the kit's slab read-only, with no links or buttons the role cannot use", async ({ page }) => {
  test.setTimeout(90_000);
  await page.setViewportSize({ width: 1440, height: 900 });
  await signInAs(page, "viewer");
  await page.goto("/kits");
  await page
    .getByRole("row", { name: /Harbour Run token set/ })
    .getByRole("link", { name: "Slab editor →" })
    .click();
  await expect(page.getByTestId("plate-map")).toBeVisible({ timeout: 30_000 });
  await expect(page.getByTestId("read-only")).toContainText("nothing here is saved");
  await expect(page.getByTestId("opt-gap")).toBeDisabled();
  await expect(page.getByLabel("Apply a template")).toBeDisabled();
  await expect(page.getByRole("button", { name: "Make the plate" })).toHaveCount(0);
  await expect(page.getByRole("button", { name: "Save as a template…" })).toHaveCount(0);
  await expect(page.getByRole("button", { name: "Undo" })).toHaveCount(0);
  await expect(page.getByTestId("kept")).toHaveCount(0);
  await expect(page.locator('a[href*="/download"]')).toHaveCount(0);
  await shots(page, "viewer");
  await page.goto("/plates");
  await expect(page.locator('a[href*="/download"]')).toHaveCount(0);
});

// After the specs above: the plate made from the template is listed under Plates.
test("at 1440 px the parts and plates tables show every action without scrolling sideways", async ({ page }) => {
  await page.setViewportSize({ width: 1440, height: 900 });
  await signInAs(page, "designer");
  for (const [path, label, action] of [
    ["/parts", "Parts", "Delete"],
    ["/plates", "Plates", "3MF"],
  ] as const) {
    await page.goto(path);
    const table = page.getByRole("table", { name: label, exact: true });
    await expect(table).toBeVisible({ timeout: 15_000 });
    const scroller = table.locator("xpath=..");
    const [scrollW, clientW] = await scroller.evaluate((el) => [el.scrollWidth, el.clientWidth]);
    expect(scrollW).toBeLessThanOrEqual(clientW + 1);
    const last = table.getByText(action, { exact: true }).first();
    const box = (await last.boundingBox())!;
    expect(box.x + box.width).toBeLessThanOrEqual(1440);
    await page.screenshot({ path: `.data/shots/table-${label.toLowerCase()}-1440.png`, fullPage: true });
  }
});
