import ExcelJS from "exceljs";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { versionDetail } from "@/schemas/curation";
import { plotsCsv, siteYearsCsv, sitesCsv, soilTestsCsv, treatmentsCsv } from "@/tests/server/curation-fixtures";
import { desktop, launchBrowser, newContext, screenshot, startServer, watchPage, type RunningServer } from "./harness";
import { signInAs } from "./page-screens";

/** The version desk's workbook path: download the draft's template, fill it, upload it, read the report, fix, re-send. */

let server: RunningServer;
let browser: Browser;
beforeAll(async () => {
  server = await startServer({ demo: true });
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

const fixtures: Record<string, string> = {
  sites: sitesCsv,
  site_years: siteYearsCsv,
  soil_tests: soilTestsCsv,
  treatments: treatmentsCsv,
  plots: plotsCsv(),
};

/** Replaces each sheet's example rows with the fixture's rows, written under the template's own headers. */
async function fillTemplate(template: Buffer, badYield: string | null): Promise<Buffer> {
  const workbook = new ExcelJS.Workbook();
  await workbook.xlsx.load(template as unknown as ArrayBuffer);
  for (const sheet of [...workbook.worksheets]) {
    const name = sheet.name.toLowerCase();
    if (name === "readme") continue;
    const csv = fixtures[name];
    if (!csv) {
      workbook.removeWorksheet(sheet.id);
      continue;
    }
    // The template's headers are kept; its example rows go with the sheet, which is written again under its own name.
    const headers = (sheet.getRow(1).values as unknown[]).slice(1).map((h) => String(h ?? ""));
    workbook.removeWorksheet(sheet.id);
    const filled = workbook.addWorksheet(sheet.name);
    filled.addRow(headers);
    const [head, ...lines] = csv.trim().split("\n");
    const cols = head!.split(",");
    lines.forEach((line, i) => {
      const cells = line.split(",");
      const values = headers.map((h) => {
        const at = cols.indexOf(h);
        let value = at < 0 ? "" : cells[at]!;
        if (name === "plots" && h === "yield_kg_ha" && i === 2 && badYield !== null) value = badYield;
        return value === "" ? null : /^-?\d+(\.\d+)?$/.test(value) ? Number(value) : value;
      });
      filled.addRow(values);
    });
  }
  return Buffer.from(await workbook.xlsx.writeBuffer());
}

describe("the workbook upload on the version desk at 1280x800", () => {
  it("downloads the draft's workbook template, uploads it filled with a bad yield cell, reads sheet/row/column, fixes it", async () => {
    const context = await newContext(browser, desktop);
    await signInAs(context, server.url, "curator");
    const slug = "workbook-desk-starter";
    const created = await context.request.post(`${server.url}/api/v1/datasets`, {
      data: {
        slug,
        title: "Workbook desk starter placement",
        crops: ["soybean"],
        region: "Tallgrass Basin",
        description: "Workbook test.",
      },
    });
    expect(created.status()).toBe(201);
    const draft = await context.request.post(`${server.url}/api/v1/datasets/${slug}/versions`, { data: {} });
    expect(draft.status()).toBe(201);
    const versionId = ((await draft.json()) as { id: string }).id;

    const page = await context.newPage();
    const problems = watchPage(page);
    await page.goto(`${server.url}/curate/versions/${versionId}`);
    await page.getByRole("tab", { name: "Upload" }).click();
    const link = page.getByRole("link", { name: "Workbook template (.xlsx, one sheet per resource)" });
    const href = await link.getAttribute("href");
    expect(href).toContain(`/api/v1/curation/versions/${versionId}/templates/workbook.xlsx`);
    await page.getByRole("link", { name: "Plots CSV template" }).waitFor();
    await page.getByRole("link", { name: "What each column means (README.txt)" }).waitFor();

    // The link's file, fetched with the page's session cookie.
    const res = await context.request.get(new URL(href!, server.url).toString());
    expect(res.status()).toBe(200);
    expect(res.headers()["content-type"]).toContain("spreadsheetml");
    const template = Buffer.from(await res.body());

    const input = page.locator('input[type="file"][aria-label="Workbook file"]');
    expect(await input.getAttribute("accept")).toContain(".xlsx");
    const mime = "application/vnd.openxmlformats-officedocument.spreadsheetml.sheet";
    await input.setInputFiles({ name: "season.xlsx", mimeType: mime, buffer: await fillTemplate(template, "n/a") });
    await page.getByRole("button", { name: "Upload workbook" }).click();
    await page.getByText(/season\.xlsx was not stored: sheet plots has 1 error/i).waitFor();
    const report = page.getByLabel(/Validation report for season\.xlsx, sheet plots/i);
    await report.waitFor();
    // Row 3 is the third data row (line 4); the column is the yield field, the value the bad cell.
    await report.getByText("3 (line 4)").waitFor();
    await report.getByText("yield_kg_ha").first().waitFor();
    await report.getByText("n/a").first().waitFor();
    await screenshot(page, "workbook-upload-rejected-desktop");

    // Nothing was stored.
    const counts = async () =>
      versionDetail.parse(await (await context.request.get(`${server.url}/api/v1/curation/versions/${versionId}`)).json()).counts;
    expect((await counts())?.sites ?? 0).toBe(0);

    await input.setInputFiles({ name: "season-fixed.xlsx", mimeType: mime, buffer: await fillTemplate(template, null) });
    await page.getByRole("button", { name: "Upload workbook" }).click();
    await page.getByText(/season-fixed\.xlsx was accepted: 5 sheet\(s\) stored/).waitFor();
    await screenshot(page, "workbook-upload-accepted-desktop");
    await expect(counts()).resolves.toMatchObject({ sites: 2, site_years: 2, treatments: 4, plots: 32 });
    // The rejected upload's 422 is the answer shown above, not a fault.
    expect(problems.filter((p) => !p.includes("status of 422"))).toEqual([]);
    await context.close();
  }, 180_000);
});
