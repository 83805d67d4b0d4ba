import { readFileSync, writeFileSync, mkdirSync } from "node:fs";
import { expect, test } from "@playwright/test";
import { signInAs } from "./helpers";

// A seller's branded template: a logo and two variables, its server-drawn thumbnail, then a plate
// from it with real values, downloaded, and the same plate through the API, byte for byte.
const LOGO = `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 40 30"><path d="M2 28 L20 2 L38 28 Z M14 24 L26 24 L20 14 Z" fill-rule="evenodd"/></svg>`;

test("a designer makes a branded template with a logo and two variables, sees its thumbnail, and makes a plate from it", async ({
  page,
}) => {
  test.setTimeout(120_000);
  await page.setViewportSize({ width: 1440, height: 1000 });
  mkdirSync(".data/test-results", { recursive: true });
  writeFileSync(".data/test-results/mark.svg", LOGO);
  const name = `Harbour thanks ${Date.now()}`;

  await signInAs(page, "designer");
  await page.goto("/kits");
  await page
    .getByRole("row", { name: /Harbour Run token set/ })
    .getByRole("link", { name: "Slab editor →" })
    .click();
  await expect(page.getByTestId("plate-map")).toBeVisible({ timeout: 30_000 });
  await page.getByLabel("Text line 1").fill("ORDER {order}");
  await page.getByLabel("Text line 2").fill("Thanks, {customer}!");
  await page.getByLabel(/SVG drawing/).setInputFiles(".data/test-results/mark.svg");
  await expect(page.getByLabel("Logo width")).toBeVisible();
  await expect(page.getByTestId("findings")).not.toContainText("error");

  await page.getByRole("button", { name: "Save as a template…" }).click();
  const save = page.getByRole("form", { name: "Save as a template" });
  await save.getByLabel("Template name").fill(name);
  await expect(save.getByText("{order}")).toBeVisible();
  await save.getByLabel("Default for {customer}").fill("friend");
  await save.getByLabel("Sample for {order}").fill("10482");
  await save.getByRole("button", { name: "Save the template" }).click();
  await expect(page.getByTestId("toasts")).toContainText(`“${name}” saved as version 1`);

  // The gallery tile's top view is drawn by a worker: wait for it.
  await page.goto(`/templates?q=${encodeURIComponent(name)}`);
  const tile = page.getByTestId("template-tile").filter({ hasText: name });
  await expect(tile).toHaveCount(1);
  await expect
    .poll(
      async () => {
        await page.reload();
        return tile.getByTestId("template-thumb").count();
      },
      { timeout: 30_000 },
    )
    .toBe(1);
  await expect(tile.locator("svg path")).toHaveCount(3); // slab, marks (text, logo, numbers, rings), pieces
  await expect(tile).toContainText("{order}");
  await expect(tile).toContainText("{customer}");
  await page.screenshot({ path: ".data/test-results/screenshots/template-gallery.png" });

  // Apply it to the kit with real values and make the plate.
  await tile.getByRole("link", { name, exact: true }).click();
  await page.getByLabel("Kit", { exact: true }).selectOption({ label: "Harbour Run token set" });
  await page.getByRole("button", { name: "Open in the slab editor" }).click();
  await expect(page.getByTestId("plate-map")).toBeVisible({ timeout: 30_000 });
  await expect(page.getByLabel("Apply a template")).toHaveValue(/.+/);
  await page.getByLabel("{order}", { exact: true }).fill("77001");
  await page.getByLabel("{customer}", { exact: true }).fill("Rowan");
  await expect(page.getByTestId("findings")).not.toContainText("error");
  await page.getByRole("button", { name: "Make the plate" }).click();
  await expect(page.getByTestId("make-status")).toHaveAttribute("data-state", "done", { timeout: 30_000 });
  const href = await page.getByRole("link", { name: "Download STL" }).getAttribute("href");
  const editorStl = Buffer.from(await (await page.request.get(href!)).body());
  const n = editorStl.readUInt32LE(80);
  expect(editorStl.byteLength).toBe(84 + 50 * n); // a valid binary STL by the size rule
  await expect(page.getByRole("table", { name: "Plates of this kit" }).getByTestId("plate-row").first()).toContainText(name);

  // The same template, kit and values through the API: the same bytes.
  const templateId = new URL(page.url()).searchParams.get("template")!;
  const creds = JSON.parse(readFileSync(process.env.SLAB_CREDENTIALS_FILE ?? ".data/demo-credentials.test.json", "utf8")) as {
    apiKey: string;
  };
  const kits = (await (await page.request.get("/api/v1/kits", { headers: { authorization: `Bearer ${creds.apiKey}` } })).json()) as {
    kits: { id: string; name: string }[];
  };
  const kitId = kits.kits.find((k) => k.name === "Harbour Run token set")!.id;
  const api = await page.request.post("/api/v1/plates", {
    headers: { authorization: `Bearer ${creds.apiKey}` },
    multipart: { kit: kitId, template: templateId, format: "stl", variables: JSON.stringify({ order: "77001", customer: "Rowan" }) },
  });
  expect(api.status()).toBe(200);
  expect(Buffer.from(await api.body()).equals(editorStl)).toBe(true);
});

// A second template under a name the workspace already has (in another case) is refused at the name
// field; a variable's label is asked for, kept through a new version, and a long value stays readable.
test("a designer cannot save two templates under one name, and gives each variable a label that stays", async ({ page }) => {
  test.setTimeout(90_000);
  await page.setViewportSize({ width: 1440, height: 900 });
  await signInAs(page, "designer");
  await page.goto("/kits");
  await page
    .getByRole("row", { name: /Harbour Run token set/ })
    .getByRole("link", { name: "Slab editor →" })
    .click();
  await expect(page.getByTestId("plate-map")).toBeVisible({ timeout: 30_000 });
  await page.getByLabel("Text line 1").fill("ORDER {order}");

  await page.getByRole("button", { name: "Save as a template…" }).click();
  const save = page.getByRole("form", { name: "Save as a template" });
  // The kit keeps its last slab: an earlier walk may have left a template applied, in which case the
  // form offers its next version first.
  const fresh = save.getByRole("radio", { name: "a new template" });
  if (await fresh.count()) await fresh.check();
  // The demo shop already has "Marrowby thank-you".
  await save.getByLabel("Template name").fill("MARROWBY THANK-YOU");
  await save.getByLabel("Label for {order}").fill("Order number");
  const sample = save.getByLabel("Sample for {order}");
  await sample.fill("Marrowby Tabletop Co.");
  // The value fits its box: nothing scrolls out of sight in the editor's column.
  expect(await sample.evaluate((el: HTMLInputElement) => el.scrollWidth <= el.clientWidth)).toBe(true);
  await page.screenshot({ path: ".data/shots/save-template-1440.png" });
  await save.getByRole("button", { name: "Save the template" }).click();
  await expect(save.getByTestId("template-name-error")).toHaveText(
    "A template called “MARROWBY THANK-YOU” already exists in this workspace. Choose another name, or save a new version of that one.",
  );
  await expect(save.getByLabel("Template name")).toHaveAttribute("aria-invalid", "true");
  await expect(page.getByTestId("toasts")).not.toContainText("saved as version 1");

  const name = `Order slip ${Date.now()}`;
  await save.getByLabel("Template name").fill(name);
  await save.getByRole("button", { name: "Save the template" }).click();
  await expect(page.getByTestId("toasts")).toContainText(`“${name}” saved as version 1`);

  // Saving again over it offers a version, with the label as it was.
  await page.getByRole("button", { name: "Save as a template…" }).click();
  await expect(save.getByLabel(/version 2 of/)).toBeChecked();
  await expect(save.getByLabel("Label for {order}")).toHaveValue("Order number");
  await save.getByRole("button", { name: "Save the template" }).click();
  await expect(page.getByTestId("toasts")).toContainText("Saved as version 2");

  await page.goto(`/templates?q=${encodeURIComponent(name)}`);
  await page.getByRole("link", { name, exact: true }).click();
  await expect(page.getByRole("heading", { name })).toBeVisible();
  await expect(page.getByTestId("version-row")).toHaveCount(2);
  const variables = page.locator("section", { has: page.getByRole("heading", { name: "Variables" }) });
  await expect(variables).toContainText("{order}Order number");
  await expect(variables).toContainText("sample “Marrowby Tabletop Co.”");
});
