import { readFileSync } from "node:fs";
import { expect, test, type APIRequestContext, type Page } from "@playwright/test";
import { PDFDocument } from "pdf-lib";
import { signInAs } from "./helpers";

// The operator's day: landing on the floor, finding an order's plate by its reference among many,
// inspecting on a phone, and printing the plate map at 1:1.
const creds = () =>
  JSON.parse(readFileSync(process.env.SLAB_CREDENTIALS_FILE ?? ".data/demo-credentials.test.json", "utf8")) as { apiKey: string };
const PX_PER_MM = 96 / 25.4; // CSS Values and Units Level 3: 1in = 96px = 2.54cm
const SIZES = [
  { name: "1440", width: 1440, height: 900 },
  { name: "1024", width: 1024, height: 768 },
  { name: "390", width: 390, height: 844 },
];

/** An order system's plate of the demo kit, with its own reference, through the plate API. */
async function apiPlate(request: APIRequestContext, reference: string): Promise<string> {
  const auth = { authorization: `Bearer ${creds().apiKey}` };
  const kits = (await (await request.get("/api/v1/kits", { headers: auth })).json()) as { kits: { id: string; name: string }[] };
  const kit = kits.kits.find((k) => k.name === "Harbour Run token set")!;
  const r = await request.post("/api/v1/plates", { headers: auth, multipart: { kit: kit.id, reference, format: "json" }, timeout: 60_000 });
  expect(r.status()).toBe(200);
  const body = (await r.json()) as { plate: { id: string; reference: string } };
  expect(body.plate.reference).toBe(reference);
  return body.plate.id;
}

async function shoot(page: Page, name: string) {
  for (const s of SIZES) {
    await page.setViewportSize({ width: s.width, height: s.height });
    await page.screenshot({ path: `.data/shots/${name}-${s.name}.png`, fullPage: true });
  }
}

test("each role lands where its work is; the owner's overview counts the workspace", async ({ browser }) => {
  for (const role of ["operator", "designer", "viewer", "owner"]) {
    const page = await browser.newPage();
    await signInAs(page, role); // waits for the role's landing page
    if (role === "owner") {
      const floor = page.getByTestId("overview-tile").filter({ hasText: "Plates waiting on the floor" });
      await expect(floor).toContainText("to print");
      await expect(page.getByTestId("overview-tile").filter({ hasText: "People" })).toContainText(/\d/);
      await expect(page.getByTestId("overview-tile").filter({ hasText: "billing period" })).toContainText(/[\d,]+ of [\d,]+/);
      await floor.getByRole("link", { name: "Open the floor →" }).click();
      await expect(page).toHaveURL(/\/floor$/);
    }
    await page.close();
  }
});

test("the floor pages a long queue, sorts and filters it in the URL, and finds an order by its reference", async ({ page, request }) => {
  test.setTimeout(120_000);
  const stamp = Date.now().toString(36);
  const reference = `ORD-${stamp}`;
  const plateId = await apiPlate(request, reference);
  // A busy day: 55 more plates waiting to print with references of their own (made in the database).
  const pg = (await import("pg")).default;
  const db = new pg.Client({ connectionString: process.env.DATABASE_URL });
  await db.connect();
  try {
    await db.query(
      `insert into plates (id, workspace_id, source, status, options, piece_count, job_state, title, reference, floor_state)
       select gen_random_uuid()::text, workspace_id, 'api', 'ready', '{}'::jsonb, 1, 'done', 'gear',
         $2 || '-' || lpad(n::text, 2, '0'), 'to_print'
       from plates, generate_series(1, 55) n where plates.id = $1`,
      [plateId, `BULK-${stamp}`],
    );
    await signInAs(page, "operator");
    await page.setViewportSize({ width: 1440, height: 900 });
    const form = page.getByRole("search", { name: "Find and sort plates" });
    await form.getByLabel("Find a plate").fill(`BULK-${stamp}`);
    await form.getByLabel("Sort").selectOption({ label: "Order reference, A to Z" });
    await form.getByRole("button", { name: "Find" }).click();
    await expect(page).toHaveURL(new RegExp(`q=BULK-${stamp}.*sort=reference`));
    const toPrint = page.getByRole("list", { name: "to print" }).getByTestId("floor-row");
    await expect(page.getByTestId("floor-range-to_print")).toHaveText("1–50 of 55");
    await expect(toPrint).toHaveCount(50);
    await expect(toPrint.first()).toContainText(`BULK-${stamp}-01 · gear`);
    await expect(toPrint.first()).toContainText("1 piece");
    await expect(toPrint.first()).not.toContainText("1 pieces");
    await page.getByRole("link", { name: "Next 5 →" }).click();
    await expect(page.getByTestId("floor-range-to_print")).toHaveText("51–55 of 55");
    await expect(toPrint.first()).toContainText(`BULK-${stamp}-51`);
    await expect(page).toHaveURL(/to-print=2/);
    await shoot(page, "floor-paged");

    // The order's own plate, by its reference, named by it, moved with a verb.
    await page.goto(`/floor?q=${reference}`);
    const row = page.getByRole("list", { name: "to print" }).getByTestId("floor-row").filter({ hasText: reference });
    await expect(row).toContainText(`${reference} · Harbour Run token set`);
    await expect(row).toContainText("6 pieces");
    await row.getByRole("button", { name: "Start printing" }).click();
    await expect(page.getByTestId("floor-notice")).toContainText("is now printing");
    const printing = page.getByRole("list", { name: "printing" }).getByTestId("floor-row").filter({ hasText: reference });
    await expect(printing.getByRole("button", { name: "Printed — inspect" })).toBeVisible();
    // The kit filter keeps it, and the URL says so.
    await page.getByRole("search").getByLabel("Kit").selectOption({ label: "Harbour Run token set" });
    await page.getByRole("search").getByRole("button", { name: "Find" }).click();
    await expect(page).toHaveURL(/kit=/);
    await expect(printing).toBeVisible();
    await shoot(page, "floor");
    await printing.getByRole("link").click();
    await expect(page.getByRole("heading", { level: 1 })).toContainText(`${reference} · Harbour Run token set`);
    await expect(page.getByTestId("plate-reference")).toHaveText(reference);
    await shoot(page, "plate");
  } finally {
    await db.query(`delete from plates where reference like $1`, [`BULK-${stamp}-%`]);
    await db.end();
  }
});

test.describe("on a phone", () => {
  test.use({ viewport: { width: 390, height: 844 } });

  test("@phone inspection asks for the defect note at the piece, keeps the reprint button clear, and follows the reprint's build", async ({
    page,
    request,
  }) => {
    test.setTimeout(120_000);
    const reference = `ORD-P${Date.now().toString(36)}`;
    const plateId = await apiPlate(request, reference);
    await signInAs(page, "operator");
    // Every section of the bar is on the screen: it wraps instead of running off the edge.
    for (const link of await page.getByRole("navigation", { name: "Sections" }).getByRole("link").all()) {
      const box = (await link.boundingBox())!;
      expect(box.x).toBeGreaterThanOrEqual(0);
      expect(box.x + box.width).toBeLessThanOrEqual(390);
    }
    await page.goto(`/floor/plates/${plateId}`);
    await page.getByRole("button", { name: "Start printing" }).click();
    await expect(page.getByTestId("floor-state")).toContainText("printing");
    await page.getByRole("button", { name: "Printed — inspect" }).click();
    await expect(page.getByTestId("floor-state")).toContainText("to inspect");
    await page.getByTestId("inspect-piece-2").getByText("defective", { exact: true }).click();
    await page.getByRole("button", { name: /Record the inspection \(1 to reprint\)/ }).click();
    // Asked at the piece, not in a passing note.
    await expect(page.getByTestId("note-error-2")).toHaveText("✕ Say what is wrong with piece 2.");
    await expect(page.getByLabel("Note for piece 2")).toBeFocused();
    await expect(page.getByLabel("Note for piece 2")).toHaveAttribute("aria-invalid", "true");
    await expect(page.getByTestId("floor-state")).toContainText("to inspect");
    await shoot(page, "inspection");
    await page.setViewportSize({ width: 390, height: 844 });
    await page.getByLabel("Note for piece 2").fill("the rim is split");
    await expect(page.getByTestId("note-error-2")).toHaveCount(0);
    await page.getByRole("button", { name: /Record the inspection/ }).click();
    await expect(page.getByTestId("floor-state")).toContainText("reprint needed");
    await expect(page.getByTestId("floor-notice")).toContainText("Recorded: 0 missing, 1 defective");
    // One result at a time, in the page: nothing floats over the button the operator needs next.
    await expect(page.getByTestId("toasts").locator(":scope > *")).toHaveCount(0);
    const reprint = page.getByRole("button", { name: "Make the reprint (1 piece)" });
    await reprint.scrollIntoViewIfNeeded();
    const box = (await reprint.boundingBox())!;
    const hit = await page.evaluate(
      ([x, y]) => document.elementFromPoint(x!, y!)?.closest("button")?.textContent ?? "",
      [box.x + box.width / 2, box.y + box.height / 2],
    );
    expect(hit).toBe("Make the reprint (1 piece)");
    await reprint.click();
    await expect(page.getByTestId("floor-state")).toContainText("reprint of", { timeout: 15_000 });
    // The reprint's page follows its build by itself: no reload.
    await expect(page.getByTestId("floor-state")).toContainText("Status: to print", { timeout: 45_000 });
    await expect(page.getByRole("heading", { level: 1 })).toContainText(reference);
  });
});

test("the plate map prints at 1:1: the page's @page size, the slab's millimetres, and the PDF's pages", async ({ page, request }) => {
  test.setTimeout(120_000);
  const plateId = await apiPlate(request, `ORD-S${Date.now().toString(36)}`);
  await signInAs(page, "operator");
  for (const [paper, size] of [
    ["a4", "210mm 297mm"], // ISO 216
    ["letter", "215.9mm 279.4mm"], // ANSI/ASME Y14.1: 8.5 × 11 in
  ] as const) {
    await page.goto(`/floor/plates/${plateId}/sheet?paper=${paper}`);
    const pageSize = await page.evaluate(() => {
      for (const sheet of Array.from(document.styleSheets))
        for (const rule of Array.from(sheet.cssRules)) if (rule instanceof CSSPageRule) return rule.style.getPropertyValue("size");
      return null;
    });
    expect(pageSize).toBe(size);
  }
  // The slab at 1:1: its drawing is as many CSS millimetres wide as the slab.
  const slab = page.getByTestId("sheet-slab").first();
  const mm = Number(await slab.getAttribute("data-mm-width"));
  expect(mm).toBeGreaterThan(20);
  expect((await slab.boundingBox())!.width).toBeCloseTo(mm * PX_PER_MM, 0);
  await expect(page.getByTestId("sheet-scale")).toContainText(/1:1/);
  await shoot(page, "sheet");
  // The PDF read back with pdf-lib: A4 pages of 210 × 297 mm (ISO 216) in points of 1/72 in.
  const pdf = await page.request.get(`/api/plates/${plateId}/map.pdf?paper=a4`);
  expect(pdf.headers()["content-type"]).toBe("application/pdf");
  const doc = await PDFDocument.load(await pdf.body());
  expect(doc.getPageCount()).toBeGreaterThanOrEqual(1);
  for (const p of doc.getPages()) {
    expect(p.getWidth()).toBeCloseTo((210 / 25.4) * 72, 1);
    expect(p.getHeight()).toBeCloseTo((297 / 25.4) * 72, 1);
  }
});
