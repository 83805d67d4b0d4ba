import { mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { expect, test } from "@playwright/test";
import { signInAs } from "./helpers";
import { pawn } from "@/lib/geometry/demo-shapes";
import { writeBinaryStl } from "@/lib/geometry/io/stl-write";

test("the demo designer uploads three files (one broken), sees progress and the refusal, and makes a kit of two parts × 3", async ({
  page,
}) => {
  const tag = Date.now().toString(36);
  const dir = mkdtempSync(path.join(tmpdir(), "slab-e2e-"));
  // A 3 MB turned piece, so the progress bar has time to show on a throttled connection.
  const big = path.join(dir, `rook-${tag}.stl`);
  writeFileSync(big, writeBinaryStl([pawn(2000)]));
  const gear = path.join(dir, `gear-${tag}.stl`);
  writeFileSync(gear, readFileSync("node_modules/stl-models/objects/gearwheel.bin.stl"));
  const broken = path.join(dir, `bunny-${tag}.stl`);
  writeFileSync(broken, readFileSync("node_modules/stl-models/objects/bunny.bin.stl")); // has holes

  await signInAs(page, "designer");
  await page.goto("/parts"); // a designer lands on the kits

  const cdp = await page.context().newCDPSession(page);
  await cdp.send("Network.enable");
  await cdp.send("Network.emulateNetworkConditions", {
    offline: false,
    latency: 20,
    downloadThroughput: -1,
    uploadThroughput: 1.5 * 1024 * 1024,
  });
  await page.getByLabel("Mesh files").setInputFiles([big, gear, broken]);
  const first = page.getByTestId(`upload-rook-${tag}.stl`);
  await expect(first.getByRole("progressbar")).toBeVisible();
  await expect(first.getByTestId("upload-state")).toContainText(/sending \d+ %|checking/);
  await expect(first.getByTestId("upload-state")).toContainText("added", { timeout: 20_000 });
  await cdp.send("Network.emulateNetworkConditions", { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: -1 });
  await expect(page.getByTestId(`upload-gear-${tag}.stl`).getByTestId("upload-state")).toContainText("added", { timeout: 20_000 });
  const bad = page.getByTestId(`upload-bunny-${tag}.stl`);
  await expect(bad.getByTestId("upload-state")).toContainText("refused", { timeout: 20_000 });
  await expect(bad.getByTestId("upload-error")).toContainText(/not closed: \d+ open edges/);
  await expect(bad.getByTestId("upload-error")).toContainText("open_mesh");

  // Both good parts are in the library with their thumbnails; the broken one is not.
  await page.getByLabel("Search parts").fill(tag);
  await expect(page.getByTestId(`part-rook-${tag}`)).toBeVisible();
  await expect(page.getByTestId(`part-gear-${tag}`)).toBeVisible();
  await expect(page.getByTestId(`part-bunny-${tag}`)).toHaveCount(0);
  await expect(page.getByTestId(`part-gear-${tag}`).getByRole("img")).toHaveJSProperty("naturalWidth", 96);

  // A kit of the two new parts, three of each.
  await page.getByRole("link", { name: "Kits" }).click();
  await page.getByRole("link", { name: "New kit" }).click();
  const kit = page.getByRole("form", { name: "Kit" });
  await kit.getByLabel("Name").fill(`Castle set ${tag}`);
  await kit.getByLabel("Part of line 1").selectOption({ label: `rook-${tag}` });
  await kit.getByLabel("Quantity of line 1").fill("3");
  await kit.getByRole("button", { name: "Add a part" }).click();
  await kit.getByLabel("Part of line 2").selectOption({ label: `gear-${tag}` });
  await kit.getByLabel("Quantity of line 2").fill("3");
  await expect(kit.getByText("6 pieces a set")).toBeVisible();
  await kit.getByRole("button", { name: "Save kit" }).click();
  await expect(page).toHaveURL(/\/kits$/);
  const row = page.getByRole("row", { name: new RegExp(`Castle set ${tag}`) });
  await expect(row).toBeVisible();
  await expect(row.getByRole("cell").nth(1)).toHaveText("6");
  await expect(row.getByRole("cell").nth(2)).toHaveText("none yet");

  // A part in a kit cannot be deleted; the refusal names the kit.
  await page.getByRole("link", { name: "Parts" }).click();
  await page.getByLabel("Search parts").fill(`gear-${tag}`);
  page.once("dialog", (d) => d.accept());
  await page.getByTestId(`part-gear-${tag}`).getByRole("button", { name: "Delete" }).click();
  await expect(page.getByTestId("parts-notice")).toContainText(`Castle set ${tag}`);
});
