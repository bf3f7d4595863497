import type { Browser, BrowserContext, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { versionDetail } from "@/schemas/curation";
import { createUser, findUserByEmail } from "@/server/services/users";
import { desktop, launchBrowser, newContext, phone, screenshot, startServer, watchPage, type RunningServer } from "./harness";

/** The workbench end to end: a curator builds and submits a dataset, a reviewer publishes it, then a second season. */

const password = "tallgrass-workbench-2026";
const curatorEmail = "curator.workbench@plotbank.test";
const reviewerEmail = "reviewer.workbench@plotbank.test";
const slug = "workbench-starter-placement";

const sitesCsv = "site,location,soil_series,soil_texture\nTB-05,Wren County,Harlan,silt loam\nTB-06,Osage Bend County,Marrow,clay loam\n";
const siteYearHeader = "site_year,site,crop,year,design,blocks,tillage,previous_crop,planting_date,row_spacing_in";
const siteYears2021 = [
  "TB-05-2021,TB-05,soybean,2021,RCBD,4,no-till,corn,2021-05-12,30",
  "TB-06-2021,TB-06,soybean,2021,RCBD,4,conventional,corn,2021-05-20,30",
];
const soilTestsCsv = (rows: string[]) => `site_year,analyte,value,unit,extractant,depth_in,class,interpretation\n${rows.join("\n")}\n`;
const treatmentsCsv =
  "treatment,name,is_check,application,product,grade,product_rate,rate_unit,placement,timing\n" +
  "CHK,Untreated check,true,1,,,,,,\n" +
  "BAND,2x2 band MAP,false,1,MAP,11-52-0,100,lb/ac,2x2-band,at-planting\n";

/** RCBD plots, 4 blocks × check and band; a band response on the low-P site-year; fixed noise so runs repeat. */
function plotsCsv(siteYears: { code: string; base: number; band: number }[]): string {
  const noise = [31, -42, 12, -8, 55, -27, 20, -16];
  const lines = ["site_year,plot,block,treatment,yield_kg_ha,harvest_moisture_pct"];
  for (const sy of siteYears) {
    let i = 0;
    for (let block = 1; block <= 4; block++) {
      for (const t of ["CHK", "BAND"]) {
        const y = sy.base + (t === "BAND" ? sy.band : 0) + noise[i]! * 2;
        lines.push(`${sy.code},${block}0${(i % 2) + 1},${block},${t},${y},13.${i}`);
        i++;
      }
    }
  }
  return `${lines.join("\n")}\n`;
}

let server: RunningServer;
let browser: Browser;

async function ensureUser(email: string, displayName: string, role: "curator" | "reviewer") {
  if (await findUserByEmail(server.ctx.db, email)) return;
  await createUser(server.ctx.db, { email, displayName, password, role, verified: true });
}

beforeAll(async () => {
  server = await startServer();
  await ensureUser(curatorEmail, "Wren Curator", "curator");
  await ensureUser(reviewerEmail, "Osage Reviewer", "reviewer");
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

async function signIn(context: BrowserContext, email: string): Promise<Page> {
  const page = await context.newPage();
  await page.goto(`${server.url}/sign-in?next=/curate`);
  await page.getByLabel("E-mail", { exact: true }).fill(email);
  await page.getByLabel("Password", { exact: true }).fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.getByRole("heading", { name: "Workbench" }).first().waitFor();
  return page;
}

async function chooseFile(page: Page, name: string, text: string) {
  await page
    .locator('input[type="file"][aria-label="CSV file"]')
    .setInputFiles({ name, mimeType: "text/csv", buffer: Buffer.from(text, "utf8") });
  await page.getByText(name, { exact: false }).first().waitFor();
}

async function uploadFile(page: Page, resource: string, name: string, text: string, expectAccepted = true) {
  await page.getByRole("radio", { name: `Resource: ${resource}`, exact: true }).click();
  await chooseFile(page, name, text);
  await page.getByRole("button", { name: `Upload ${resource.toLowerCase()}` }).click();
  await page.getByText(expectAccepted ? `${name} was accepted` : `${name} was not stored`).waitFor();
}

async function versionOf(page: Page): Promise<string> {
  await page.waitForURL(/\/curate\/versions\/[0-9a-f-]{36}$/);
  return page.url().split("/").pop()!;
}

async function apiVersion(page: Page, id: string) {
  const res = await page.request.get(`${server.url}/api/v1/curation/versions/${id}`);
  expect(res.status()).toBe(200);
  return versionDetail.parse(await res.json());
}

describe("the curator's workbench at desktop size", () => {
  it("creates, uploads, submits, is published by a reviewer, then ships a new season as a MINOR version", async () => {
    const curatorCtx = await newContext(browser, desktop);
    const page = await signIn(curatorCtx, curatorEmail);
    const problems = watchPage(page);

    // Reviewers' actions are not offered to curators: the nav has the workbench, the page has "New dataset".
    await page.getByRole("link", { name: "Workbench" }).first().waitFor();
    await page.getByRole("link", { name: "New dataset" }).click();
    await page.getByRole("heading", { name: "New dataset" }).first().waitFor();

    // The shared schema checks the form before anything is sent; the error sits at its field.
    await page.getByRole("button", { name: "Create dataset" }).click();
    await expect(page.getByLabel("Title", { exact: true }).getAttribute("aria-invalid")).resolves.toBe("true");
    await page.getByText(/Please correct \d+ fields? above/).waitFor();

    await page.getByLabel("Title", { exact: true }).fill("Workbench starter placement on soybean");
    await page.getByLabel("Slug (web address)", { exact: true }).fill(slug);
    await page.getByRole("checkbox", { name: "Crops: Soybean" }).click();
    await page.getByLabel("Region", { exact: true }).fill("Tallgrass Basin, east");
    await page
      .getByLabel("Description", { exact: true })
      .fill("Check versus 2x2 band MAP on soybean at two invented Tallgrass Basin sites.");
    await page.getByRole("button", { name: "Add contributor" }).click();
    await page.getByLabel("Contributor 1 name", { exact: true }).fill("Tallgrass Basin Agronomy Network");
    await page.getByLabel("Contributor 1 ORCID iD (optional)", { exact: true }).fill("1234");
    await page.getByRole("button", { name: "Create dataset" }).click();
    await page.getByText("an ORCID iD looks like 0000-0002-1825-0097").waitFor();
    await page.getByLabel("Contributor 1 ORCID iD (optional)", { exact: true }).fill("");
    await screenshot(page, "curation-new-dataset-desktop");
    await page.getByRole("button", { name: "Create dataset" }).click();

    await page.waitForURL(new RegExp(`/curate/datasets/${slug}$`));
    await page.getByRole("status").getByText("No versions yet").waitFor();
    await page.getByRole("button", { name: "Start version 1.0.0" }).click();
    const v1 = await versionOf(page);
    // The data dictionary: a bad number is caught at its cell by the shared schema; a good edit is saved.
    await page.getByRole("tab", { name: "Data dictionary" }).click();
    await page.getByRole("table", { name: "Plots data dictionary" }).waitFor();
    await page.getByLabel("Plots field vigour: Minimum", { exact: true }).fill("ten");
    await page.getByRole("button", { name: "Save dictionary" }).click();
    await expect(page.getByLabel("Plots field vigour: Minimum", { exact: true }).getAttribute("aria-invalid")).resolves.toBe("true");
    await page.getByText(/The dictionary was not saved: 1 problem/).waitFor();
    await page.getByLabel("Plots field vigour: Minimum", { exact: true }).fill("1");
    await page.getByLabel("Plots field vigour: Unit", { exact: true }).fill("score");
    await page.getByRole("button", { name: "Save dictionary" }).click();
    await page.getByText("Dictionary saved.").waitFor();
    const vigour = (await apiVersion(page, v1)).tableSchema.resources.plots?.fields.find((f) => f.name === "vigour");
    expect(vigour).toMatchObject({ unit: "score", constraints: { minimum: 1, maximum: 9 } });
    await screenshot(page, "curation-dictionary-desktop");
    await page.getByRole("tab", { name: "Upload" }).click();

    await uploadFile(page, "Sites", "sites.csv", sitesCsv);
    // A bad file first: the year is not a year. The report names the row and the column, and nothing is stored.
    const badSiteYears = `${siteYearHeader}\n${siteYears2021[0]}\n${siteYears2021[1]!.replace(",2021,RCBD", ",20x1,RCBD")}\n`;
    await uploadFile(page, "Site-years", "site-years.csv", badSiteYears, false);
    const badRow = page.getByRole("row", { name: /^error in row 2, column year:/ });
    await badRow.waitFor();
    await expect(badRow.getByRole("cell").nth(2).textContent()).resolves.toBe("2 (line 3)");
    await expect(badRow.getByRole("cell").nth(4).textContent()).resolves.toBe("20x1");
    await page.getByLabel("Search problems", { exact: true }).fill("no such message anywhere");
    await page.getByText("Nothing matches the filter").waitFor();
    await page.getByLabel("Search problems", { exact: true }).fill("");
    await page.getByRole("radio", { name: "Severity: Errors", exact: true }).click();
    await badRow.waitFor();
    const download = page.waitForEvent("download");
    await page.getByRole("button", { name: "Download report (CSV)" }).click();
    const csv = await (await download).createReadStream().then(async (s) => {
      const chunks: Buffer[] = [];
      for await (const c of s) chunks.push(c as Buffer);
      return Buffer.concat(chunks).toString("utf8");
    });
    expect(csv).toMatch(/20x1/);
    await screenshot(page, "curation-bad-upload-report-desktop");
    expect((await apiVersion(page, v1)).counts?.site_years ?? 0).toBe(0);

    await uploadFile(page, "Site-years", "site-years.csv", `${siteYearHeader}\n${siteYears2021.join("\n")}\n`);
    await uploadFile(
      page,
      "Soil tests",
      "soil-tests.csv",
      soilTestsCsv([
        "TB-05-2021,P,7,ppm,Bray-P1,6,low,tallgrass-illustrative",
        "TB-06-2021,P,26,ppm,Bray-P1,6,very_high,tallgrass-illustrative",
      ]),
    );
    await uploadFile(page, "Treatments", "treatments.csv", treatmentsCsv);
    await uploadFile(
      page,
      "Plots",
      "plots-2021.csv",
      plotsCsv([
        { code: "TB-05-2021", base: 3500, band: 320 },
        { code: "TB-06-2021", base: 4050, band: 10 },
      ]),
    );
    const drafted = await apiVersion(page, v1);
    expect(drafted.counts).toMatchObject({ sites: 2, site_years: 2, soil_tests: 2, treatments: 2, plots: 16 });
    expect(drafted.responses).toBe(2);

    await page.getByRole("tab", { name: "Overview" }).click();
    await page.getByLabel("Plots: 16").waitFor();
    // A curator never sees the reviewer's steps.
    await expect(page.getByRole("button", { name: "Approve and publish" }).count()).resolves.toBe(0);
    await page.getByRole("button", { name: "Submit for review" }).click();
    await page.getByRole("button", { name: "Confirm: submit for review" }).click();
    await page.getByText("needs at least 3 characters, found 0; write a few more words").first().waitFor();
    await page.getByLabel("Changelog", { exact: true }).fill("First release: the 2021 season at TB-05 and TB-06.");
    await expect(page.getByLabel("Version number", { exact: true }).inputValue()).resolves.toBe("1.0.0");
    await page.getByRole("button", { name: "Confirm: submit for review" }).click();
    await page.getByText("In review", { exact: true }).filter({ visible: true }).first().waitFor();
    await screenshot(page, "curation-submitted-desktop");

    // The reviewer, in a separate browser context, finds it in the queue and publishes it.
    const reviewerCtx = await newContext(browser, desktop);
    const rpage = await signIn(reviewerCtx, reviewerEmail);
    const rproblems = watchPage(rpage);
    await rpage.getByText("Waiting for review").waitFor();
    await rpage.getByRole("link", { name: "Review Workbench starter placement on soybean version 1.0.0" }).click();
    await versionOf(rpage);
    await screenshot(rpage, "curation-review-desktop");
    await rpage.getByRole("button", { name: "Approve and publish" }).click();
    await rpage.getByRole("button", { name: "Confirm: approve and publish" }).click();
    await rpage.getByText("Published", { exact: true }).filter({ visible: true }).first().waitFor();
    const published = await apiVersion(rpage, v1);
    expect(published.state).toBe("published");
    expect(published.checksum).toMatch(/^sha256:/);

    // The next season: a new version starts as a copy; adding a site-year is a MINOR change.
    await page.goto(`${server.url}/curate/datasets/${slug}`);
    await page.getByRole("button", { name: "Start a new version" }).click();
    const v2 = await versionOf(page);
    await page.getByText("Based on v1.0.0").waitFor();
    await page.getByRole("tab", { name: "Upload" }).click();
    await uploadFile(
      page,
      "Site-years",
      "site-years-2022.csv",
      `${siteYearHeader}\nTB-05-2022,TB-05,soybean,2022,RCBD,4,no-till,corn,2022-05-10,30\n`,
    );
    await uploadFile(page, "Soil tests", "soil-tests-2022.csv", soilTestsCsv(["TB-05-2022,P,9,ppm,Bray-P1,6,low,tallgrass-illustrative"]));
    await uploadFile(page, "Plots", "plots-2022.csv", plotsCsv([{ code: "TB-05-2022", base: 3650, band: 280 }]));
    await page.getByRole("tab", { name: "Changes since v1.0.0" }).click();
    await page.getByText("MINOR → v1.1.0").waitFor();
    await page.getByText("TB-05-2022").first().waitFor();
    await screenshot(page, "curation-diff-minor-desktop");

    await page.getByRole("button", { name: "Submit for review" }).click();
    await expect(page.getByLabel("Version number", { exact: true }).inputValue()).resolves.toBe("1.1.0");
    await page.getByLabel("Changelog", { exact: true }).fill("Adds the 2022 season at TB-05.");
    await page.getByRole("button", { name: "Confirm: submit for review" }).click();
    await page.getByText("In review", { exact: true }).filter({ visible: true }).first().waitFor();

    await rpage.goto(`${server.url}/curate/versions/${v2}`);
    await rpage.getByRole("button", { name: "Approve and publish" }).click();
    await rpage.getByRole("button", { name: "Confirm: approve and publish" }).click();
    await rpage.getByText("Published", { exact: true }).filter({ visible: true }).first().waitFor();
    expect((await apiVersion(rpage, v2)).state).toBe("published");

    // The timeline shows both publications, newest first.
    await page.goto(`${server.url}/curate/datasets/${slug}`);
    await page.getByRole("link", { name: /^v1\.1\.0 Published/ }).waitFor();
    await page.getByRole("link", { name: /^v1\.0\.0 Published/ }).waitFor();
    await screenshot(page, "curation-timeline-desktop");

    // The one rejected file is answered 422 by design; Chromium logs every 4xx. Anything else is a failure.
    expect(problems.filter((p) => !/status of 422/.test(p))).toEqual([]);
    expect(problems.filter((p) => /status of 422/.test(p))).toHaveLength(1);
    expect(rproblems).toEqual([]);
    await curatorCtx.close();
    await reviewerCtx.close();
  });
});

describe("the workbench at phone size", () => {
  it("the dataset's versions and data dictionary fit a phone without sideways page scroll", async () => {
    const context = await newContext(browser, phone);
    const page = await signIn(context, curatorEmail);
    const problems = watchPage(page);
    await page.goto(`${server.url}/curate/datasets/${slug}`);
    await page.getByRole("link", { name: /^v1\.1\.0 Published/ }).click();
    await versionOf(page);
    await page.getByRole("tab", { name: "Data dictionary" }).click();
    await page.getByRole("table", { name: "Plots data dictionary" }).waitFor();
    // A published version's dictionary is read-only: no inputs, no save.
    await expect(page.getByRole("button", { name: "Save dictionary" }).count()).resolves.toBe(0);
    const scrollWidth = await page.evaluate(() => document.documentElement.scrollWidth);
    expect(scrollWidth).toBeLessThanOrEqual(phone.width);
    await screenshot(page, "curation-dictionary-phone");
    expect(problems).toEqual([]);
    await context.close();
  });
});
