import { and, eq } from "drizzle-orm";
import type { Browser, BrowserContext, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { datasets, versions } from "@/db/schema";
import { approveVersion, submitVersion } from "@/server/services/curation/review";
import { findUserByEmail } from "@/server/services/users";
import { curationDataset, versionDetail } from "@/schemas/curation";
import { versionRowsPage } from "@/schemas/review";
import {
  axeViolations,
  desktop,
  launchBrowser,
  newContext,
  phone,
  screenshot,
  startServer,
  watchPage,
  type RunningServer,
} from "./harness";
import { signInAs } from "./page-screens";

/**
 * The version desk's own editing, on the demo datasets: a one-row correction merged into a new draft, a cell changed
 * in the data grid with a reason, and a field of the curator's own added, renamed and removed in the data dictionary.
 */

let server: RunningServer;
let browser: Browser;
const mergeSlug = "soybean-n-s-planting-date";

beforeAll(async () => {
  server = await startServer({ demo: true });
  // The N and S dataset's open draft (a planting-date correction) is published first, so the curator starts a new
  // draft of a dataset whose every version is published.
  const db = server.ctx.db;
  const [dataset] = await db.select().from(datasets).where(eq(datasets.slug, mergeSlug));
  const [draft] = await db
    .select()
    .from(versions)
    .where(and(eq(versions.datasetId, dataset!.id), eq(versions.state, "draft")));
  const user = async (email: string) => (await findUserByEmail(db, email)) as Express.User;
  await submitVersion(server.ctx, await user("curator@plotbank.test"), draft!.id, "Correction: the normal planting date of TB-05-2024-N.");
  await approveVersion(server.ctx, await user("reviewer@plotbank.test"), draft!.id, "Checked against the field book.");
  browser = await launchBrowser();
}, 180_000);
afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

/** A signed-in curator's page, watched for page errors. */
async function curatorPage(viewport: {
  width: number;
  height: number;
}): Promise<{ context: BrowserContext; page: Page; problems: string[] }> {
  const context = await newContext(browser, viewport);
  await signInAs(context, server.url, "curator");
  const page = await context.newPage();
  return { context, page, problems: watchPage(page) };
}

async function apiVersion(page: Page, id: string) {
  return versionDetail.parse(await (await page.request.get(`${server.url}/api/v1/curation/versions/${id}`)).json());
}

async function apiRows(page: Page, id: string, resource: string, limit = 50) {
  const res = await page.request.get(`${server.url}/api/v1/curation/versions/${id}/rows/${resource}?page=1&limit=${limit}`);
  expect(res.status()).toBe(200);
  return versionRowsPage.parse(await res.json());
}

async function draftOf(page: Page, slug: string): Promise<string> {
  const res = await page.request.get(`${server.url}/api/v1/curation/datasets/${slug}`);
  const draft = curationDataset.parse(await res.json()).versions.find((v) => v.state === "draft");
  expect(draft, `${slug} has a draft`).toBeDefined();
  return draft!.id;
}

/** The first plots row of a version, as the rows page prints it, with the position of each field. */
async function firstPlot(page: Page, id: string) {
  const rows = await apiRows(page, id, "plots", 1);
  const at = (f: string) => rows.fields.indexOf(f);
  return { rows, row: rows.rows[0]!, at };
}

describe("the version desk's data grid, dictionary and merge uploads at 1280x800", () => {
  it("merges a one-row plots correction into a new draft of a published dataset; the diff shows old → new", async () => {
    const { context, page, problems } = await curatorPage(desktop);
    await page.goto(`${server.url}/curate/datasets/${mergeSlug}`);
    await page.getByRole("button", { name: "Start a new version" }).click();
    await page.waitForURL(/\/curate\/versions\/[0-9a-f-]{36}$/);
    const id = page.url().split("/").pop()!;
    await page.getByText("Based on v1.1.1", { exact: false }).first().waitFor();

    const { rows, row, at } = await firstPlot(page, id);
    const old = row[at("yield_kg_ha")]!;
    const corrected = String(Math.round(Number(old)) + 150);
    const csvRow = row.map((v, i) => (i === at("yield_kg_ha") ? corrected : (v ?? "")));
    const csv = `${rows.fields.join(",")}\n${csvRow.join(",")}\n`;
    const where = `${row[at("site_year")]}/${row[at("plot")]}`;

    await page.getByRole("tab", { name: "Upload" }).click();
    await page.getByRole("radio", { name: "Resource: Plots", exact: true }).click();
    await page
      .locator('input[type="file"][aria-label="CSV file"]')
      .setInputFiles({ name: "plots-one-row.csv", mimeType: "text/csv", buffer: Buffer.from(csv, "utf8") });
    await page.getByText("plots-one-row.csv", { exact: false }).first().waitFor();
    await page.getByRole("button", { name: "Column mapping and units" }).click();
    await page.getByRole("radio", { name: "How to combine: Merge with what is there", exact: true }).click();
    await expect(
      page.getByRole("radio", { name: "How to combine: Merge with what is there", exact: true }).getAttribute("aria-checked"),
    ).resolves.toBe("true");
    await page.getByRole("button", { name: "Upload plots" }).click();
    await page.getByText("plots-one-row.csv was accepted").waitFor();
    await screenshot(page, "desk-merge-one-row-desktop");

    // The merge kept every other plot and changed the one row.
    const after = await apiRows(page, id, "plots", 500);
    expect(after.total).toBe(rows.total);
    const key = (r: (string | null)[]) => `${r[at("site_year")]}/${r[at("plot")]}`;
    expect(after.rows.find((r) => key(r) === where)?.[at("yield_kg_ha")]).toBe(corrected);

    // The review panel's diff against v1.1.1 shows the one changed row, old → new.
    await page.getByRole("tab", { name: "Review: data and results" }).click();
    await page.getByRole("list", { name: "Plots: rows that differ" }).waitFor();
    const changed = page.getByRole("list", { name: "Plots: rows that differ" }).getByRole("listitem");
    await expect(changed.count()).resolves.toBe(1);
    await changed.getByText(`yield_kg_ha: ${old} → ${corrected}`).waitFor();
    await changed.first().scrollIntoViewIfNeeded();
    await screenshot(page, "desk-merge-diff-desktop");

    // The data grid shows the stored value.
    await page.getByRole("tab", { name: "Data grid" }).click();
    await page
      .getByRole("table", { name: "Plots rows" })
      .getByRole("button", { name: `${corrected}: change yield_kg_ha of site_year ${row[at("site_year")]}, plot ${row[at("plot")]}` })
      .waitFor();

    // The published version it is based on shows the same grid read-only: no cell to pick, no Upload tab.
    await page.goto(`${server.url}/curate/versions/${(await apiVersion(page, id)).basedOnVersionId}`);
    await page.getByRole("tab", { name: "Data grid" }).click();
    const published = page.getByRole("table", { name: "Site-years rows" });
    await published.getByText(row[at("site_year")]!, { exact: true }).first().waitFor();
    await page.getByText(/This version is published, so its rows are read-only/).waitFor();
    await expect(published.getByRole("button").count()).resolves.toBe(0);
    await expect(page.getByRole("tab", { name: "Upload" }).count()).resolves.toBe(0);
    expect(problems).toEqual([]);
    await context.close();
  }, 180_000);

  it("changes one cell with a reason: a bad value is refused at the input and changes nothing; a good one shows in the grid and changelog", async () => {
    const { context, page, problems } = await curatorPage(desktop);
    const id = await draftOf(page, "corn-2x2-nk-starter-rates");
    const { row, at } = await firstPlot(page, id);
    const siteYear = row[at("site_year")]!;
    const plot = row[at("plot")]!;
    const old = row[at("yield_kg_ha")]!;
    const changelogBefore = (await apiVersion(page, id)).changelog;

    await page.goto(`${server.url}/curate/versions/${id}`);
    await page.getByRole("tab", { name: "Data grid" }).click();
    const grid = page.getByRole("table", { name: "Plots rows" });
    await grid.waitFor();
    // Key fields are not offered for editing.
    await expect(grid.getByRole("button", { name: /: change site_year of / }).count()).resolves.toBe(0);
    await expect(grid.getByRole("button", { name: /: change plot of / }).count()).resolves.toBe(0);
    await grid.getByRole("button", { name: `${old}: change yield_kg_ha of site_year ${siteYear}, plot ${plot}` }).click();
    const form = page.getByRole("group", { name: `Change yield_kg_ha of site_year ${siteYear}, plot ${plot}` });
    await form.waitFor();
    await expect(form.getByLabel("New value", { exact: true }).inputValue()).resolves.toBe(old);

    // The reason is required.
    await form.getByLabel("New value", { exact: true }).fill("lots");
    await form.getByRole("button", { name: "Save the change" }).click();
    await expect(form.getByLabel("Reason for the change", { exact: true }).getAttribute("aria-invalid")).resolves.toBe("true");

    // A value the dictionary refuses: the server's answer sits at the input, and nothing changed.
    await form.getByLabel("Reason for the change", { exact: true }).fill("Re-read from the field book after harvest.");
    await form.getByRole("button", { name: "Save the change" }).click();
    await expect.poll(() => form.getByLabel("New value", { exact: true }).getAttribute("aria-invalid"), { timeout: 15_000 }).toBe("true");
    const refusal = (await form.getByRole("alert").allTextContents()).join(" ");
    expect(refusal).toMatch(/number/i);
    await screenshot(page, "desk-grid-refused-desktop");
    expect((await axeViolations(page)).map((v) => `${v.id}: ${v.nodes.map((n) => n.html).join(" | ")}`)).toEqual([]);
    expect((await firstPlot(page, id)).row[at("yield_kg_ha")]).toBe(old);
    expect((await apiVersion(page, id)).changelog).toBe(changelogBefore);
    await grid.getByRole("button", { name: `${old}: change yield_kg_ha of site_year ${siteYear}, plot ${plot}` }).waitFor();

    // A good value: the grid shows it and the changelog records the change with its reason.
    const corrected = String(Math.round(Number(old)) + 210);
    await form.getByLabel("New value", { exact: true }).fill(corrected);
    await form.getByRole("button", { name: "Save the change" }).click();
    const line = `Edited plots site_year ${siteYear}, plot ${plot}: yield_kg_ha ${old} → ${corrected}. Reason: Re-read from the field book after harvest.`;
    await page
      .getByRole("status")
      .filter({ hasText: `Saved: yield_kg_ha of site_year ${siteYear}, plot ${plot} is now ${corrected}` })
      .waitFor();
    await page.getByRole("status").getByText(`Changelog: ${line}`).waitFor();
    await grid.getByRole("button", { name: `${corrected}: change yield_kg_ha of site_year ${siteYear}, plot ${plot}` }).waitFor();
    // The desk's head shows the version's changelog, now with the line.
    await page.getByText(line, { exact: false }).first().waitFor();
    await screenshot(page, "desk-grid-saved-desktop");
    expect((await firstPlot(page, id)).row[at("yield_kg_ha")]).toBe(corrected);
    expect((await apiVersion(page, id)).changelog).toContain(line);
    // The refused edit is answered 422 by design; Chromium logs every 4xx.
    expect(problems.filter((p) => !/status of 422/.test(p))).toEqual([]);
    await context.close();
  }, 180_000);

  it("adds a field of the curator's own in the dictionary, fills a cell of it, renames it (the value follows) and removes it", async () => {
    const { context, page, problems } = await curatorPage(desktop);
    const id = await draftOf(page, "soybean-starter-p-placement");
    const before = (await apiVersion(page, id)).tableSchema;
    const count = before.resources.plots!.fields.length;
    const { row, at } = await firstPlot(page, id);
    const where = `site_year ${row[at("site_year")]}, plot ${row[at("plot")]}`;

    await page.goto(`${server.url}/curate/versions/${id}`);
    await page.getByRole("tab", { name: "Data dictionary" }).click();
    await page.getByRole("table", { name: "Plots data dictionary" }).waitFor();
    await page.getByRole("button", { name: "Add field" }).click();
    const newName = page.getByLabel(`Plots new field ${count + 1}: Field`, { exact: true });
    // Typed key by key, as a person would: the cell keeps its name (and focus) while its value changes.
    await newName.click();
    await page.keyboard.type("seed_lot");
    await expect(newName.inputValue()).resolves.toBe("seed_lot");
    await page.getByLabel(`Plots new field ${count + 1}: Description`, { exact: true }).fill("Seed lot on the bag tag.");
    await page.getByRole("button", { name: "Save dictionary" }).click();
    await page.getByText("Dictionary saved.").waitFor();
    let plots = (await apiVersion(page, id)).tableSchema.resources.plots!.fields;
    expect(plots.map((f) => f.name)).toEqual([...before.resources.plots!.fields.map((f) => f.name), "seed_lot"]);
    expect(plots.at(-1)).toMatchObject({ name: "seed_lot", type: "string", description: "Seed lot on the bag tag." });
    // The rest of the dictionary (its soil-test schemes and measures) is saved as it was.
    const after = (await apiVersion(page, id)).tableSchema;
    expect(after.soilTestSchemes ?? []).toEqual(before.soilTestSchemes ?? []);
    expect(after.measures ?? []).toEqual(before.measures ?? []);
    await screenshot(page, "desk-dictionary-added-desktop");
    expect((await axeViolations(page)).map((v) => `${v.id}: ${v.nodes.map((n) => n.html).join(" | ")}`)).toEqual([]);

    // A value in the new field, through the grid.
    await page.getByRole("tab", { name: "Data grid" }).click();
    await page.getByRole("button", { name: `empty: change seed_lot of ${where}` }).click();
    await page.getByLabel("New value", { exact: true }).fill("LOT-17");
    await page.getByLabel("Reason for the change", { exact: true }).fill("Bag tag read at planting.");
    await page.getByRole("button", { name: "Save the change" }).click();
    await page.getByRole("button", { name: `LOT-17: change seed_lot of ${where}` }).waitFor();

    // Plotbank's own fields keep their names: the server's refusal sits at the Field cell, and nothing is saved.
    await page.getByRole("tab", { name: "Data dictionary" }).click();
    await page.getByLabel("Plots field vigour: Field", { exact: true }).fill("vigor");
    await page.getByRole("button", { name: "Save dictionary" }).click();
    await expect
      .poll(() => page.getByLabel("Plots field vigour: Field", { exact: true }).getAttribute("aria-invalid"), { timeout: 15_000 })
      .toBe("true");
    await page.getByText(/vigour is a field Plotbank stores/).waitFor();
    expect((await apiVersion(page, id)).tableSchema.resources.plots!.fields.some((f) => f.name === "vigour")).toBe(true);
    await page.getByLabel("Plots field vigour: Field", { exact: true }).fill("vigour");

    // Renaming the curator's own field: the stored value follows the new name.
    await page.getByLabel("Plots field seed_lot: Field", { exact: true }).fill("seed_batch");
    await page.getByRole("button", { name: "Save dictionary" }).click();
    await page.getByText("Dictionary saved.").waitFor();
    plots = (await apiVersion(page, id)).tableSchema.resources.plots!.fields;
    expect(plots.map((f) => f.name)).toContain("seed_batch");
    expect(plots.map((f) => f.name)).not.toContain("seed_lot");
    const renamed = await apiRows(page, id, "plots", 1);
    expect(renamed.rows[0]![renamed.fields.indexOf("seed_batch")]).toBe("LOT-17");
    await page.getByLabel("Plots field seed_batch: Field", { exact: true }).waitFor();
    await screenshot(page, "desk-dictionary-renamed-desktop");

    // Removing it takes its values with it.
    await page.getByRole("button", { name: "Remove plots field seed_batch" }).click();
    await expect(page.getByLabel("Plots field seed_batch: Field", { exact: true }).count()).resolves.toBe(0);
    await page.getByRole("button", { name: "Save dictionary" }).click();
    await page.getByText("Dictionary saved.").waitFor();
    plots = (await apiVersion(page, id)).tableSchema.resources.plots!.fields;
    expect(plots.map((f) => f.name)).toEqual(before.resources.plots!.fields.map((f) => f.name));
    expect((await apiRows(page, id, "plots", 1)).fields).not.toContain("seed_batch");
    await page.getByRole("tab", { name: "Data grid" }).click();
    await page.getByRole("table", { name: "Plots rows" }).waitFor();
    await expect(page.getByRole("button", { name: /: change seed_batch of / }).count()).resolves.toBe(0);
    // The refused rename is a 400 answered at its cell; Chromium logs every 4xx.
    expect(problems.filter((p) => !/status of 400/.test(p))).toEqual([]);
    await context.close();
  }, 180_000);
});

describe("the data grid and dictionary at phone size", () => {
  it("fit a phone: the grid scrolls sideways inside its frame, the edit form and dictionary stay on the page", async () => {
    const { context, page, problems } = await curatorPage(phone);
    const id = await draftOf(page, "corn-2x2-nk-starter-rates");
    await page.goto(`${server.url}/curate/versions/${id}`);
    await page.getByRole("tab", { name: "Data grid" }).click();
    const grid = page.getByRole("table", { name: "Plots rows" });
    await grid.waitFor();
    await grid
      .getByRole("button", { name: /: change harvest_moisture_pct of / })
      .first()
      .click();
    // The form opens focused, which brings it into view below the grid.
    await expect.poll(() => page.evaluate(() => document.activeElement?.getAttribute("aria-label")), { timeout: 10_000 }).toBe("New value");
    const width = () => page.evaluate(() => document.documentElement.scrollWidth);
    await expect(width()).resolves.toBeLessThanOrEqual(phone.width);
    await screenshot(page, "desk-grid-phone");
    await page.getByRole("tab", { name: "Data dictionary" }).click();
    await page.getByRole("table", { name: "Plots data dictionary" }).waitFor();
    await page.getByRole("button", { name: "Add field" }).click();
    const fields = (await apiVersion(page, id)).tableSchema.resources.plots!.fields.length;
    await page.getByLabel(`Plots new field ${fields + 1}: Field`, { exact: true }).scrollIntoViewIfNeeded();
    await expect(width()).resolves.toBeLessThanOrEqual(phone.width);
    await screenshot(page, "desk-dictionary-phone");
    expect(problems).toEqual([]);
    await context.close();
  }, 120_000);
});
