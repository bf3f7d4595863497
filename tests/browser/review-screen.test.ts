import { readFileSync } from "node:fs";
import { and, eq } from "drizzle-orm";
import type { Browser, BrowserContext, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { demoPassword } from "@/datasets";
import { datasets, versions } from "@/db/schema";
import { reviewComments, reviewSummary } from "@/schemas/review";
import { versionDetail } from "@/schemas/curation";
import { submitVersion } from "@/server/services/curation/review";
import { findUserByEmail } from "@/server/services/users";
import { desktop, launchBrowser, newContext, screenshot, startServer, watchPage, type RunningServer } from "./harness";

/**
 * The reviewer reads the draft before approving: its Evidence preview, its per-site-year results, a comment on one
 * site-year, a return; the curator sees the comment beside the site-year and submits again; the reviewer approves.
 * On the demo's corn draft, with the demo accounts.
 */

let server: RunningServer;
let browser: Browser;
let versionId: string;

beforeAll(async () => {
  server = await startServer();
  const db = server.ctx.db;
  const [dataset] = await db.select().from(datasets).where(eq(datasets.slug, "corn-2x2-nk-starter-rates"));
  const [draft] = await db
    .select()
    .from(versions)
    .where(and(eq(versions.datasetId, dataset!.id), eq(versions.state, "draft")));
  versionId = draft!.id;
  // The curator has already sent the 2025 season for review (the submit form itself is tested in curation.test.ts).
  const curator = await findUserByEmail(db, "curator@plotbank.test");
  await submitVersion(server.ctx, { ...curator!, role: "curator" } as Express.User, versionId, "Adds the 2025 season.");
  browser = await launchBrowser();
}, 180_000);
afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

async function signIn(context: BrowserContext, email: string): Promise<Page> {
  const page = await context.newPage();
  await page.goto(`${server.url}/sign-in?next=/curate/versions/${versionId}`);
  await page.getByLabel("E-mail", { exact: true }).fill(email);
  await page.getByLabel("Password", { exact: true }).fill(demoPassword);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL(new RegExp(`/curate/versions/${versionId}$`));
  return page;
}

/** axe-core's rule ids that the review panel breaks, read over the DevTools protocol (the page's CSP stays as served). */
async function axeRuleIdsBroken(page: Page): Promise<string[]> {
  await page.evaluate(readFileSync(require.resolve("axe-core/axe.min.js"), "utf8"));
  return page.evaluate(async () => {
    const run = (window as unknown as { axe: { run: (d: Document) => Promise<{ violations: { id: string; nodes: unknown[] }[] }> } }).axe
      .run;
    return (await run(document)).violations.map((v) => `${v.id} (${v.nodes.length})`);
  });
}

async function openReview(page: Page) {
  await page.getByRole("tab", { name: "Review: data and results" }).click();
  await page.getByRole("heading", { name: "Per-site-year results" }).waitFor();
}

describe("reviewing with the data in view, at 1280x800", () => {
  it("the reviewer previews and comments, returns; the curator answers and re-submits; the reviewer approves", async () => {
    const reviewerCtx = await newContext(browser, desktop);
    const rpage = await signIn(reviewerCtx, "reviewer@plotbank.test");
    const rproblems = watchPage(rpage);
    await openReview(rpage);

    // The draft's Evidence preview, labelled as such.
    await rpage.getByRole("button", { name: /Draft preview of the Evidence screen/ }).click();
    await rpage.getByText("Draft preview — not published").waitFor();
    await rpage.getByTestId("pooled-estimate").waitFor();
    await expect(rpage.getByTestId("k-site-years").textContent()).resolves.toMatch(/^\d+ site-years from 1 dataset$/);

    // The per-site-year results: each site-year with its ANOVA line.
    const summary = reviewSummary.parse(
      await (await rpage.request.get(`${server.url}/api/v1/curation/versions/${versionId}/review`)).json(),
    );
    const siteYear = summary.siteYears[0]!.siteYear;
    const card = rpage.getByTestId(`site-year-${siteYear}`);
    await expect(card.getByTestId(`anova-line-${siteYear}`).textContent()).resolves.toMatch(
      /^F = \d+\.\d\d on 3 and 12 df, p [=<] .* · LSD\(0\.05\) .* · CV \d+\.\d %$/,
    );
    await card.getByRole("table", { name: `Responses at ${siteYear}` }).waitFor();
    await card.getByRole("button", { name: `Full ANOVA of ${siteYear}` }).waitFor();
    // The draft's rows, read-only for the reviewer.
    const rows = rpage.getByRole("table", { name: "Site-years rows" });
    await rows.getByText(siteYear, { exact: true }).first().waitFor();
    await expect(rows.getByRole("button", { name: /: change / }).count()).resolves.toBe(0);
    await screenshot(rpage, "review-screen-reviewer-desktop");
    await expect(axeRuleIdsBroken(rpage)).resolves.toEqual([]);

    const comment = `Block 2 of ${siteYear} reads low against the other blocks; please check the field book.`;
    await card.getByLabel(`Comment on ${siteYear}`, { exact: true }).fill(comment);
    await card.getByRole("button", { name: `Add comment on ${siteYear}` }).click();
    await card.getByTestId("review-comment").filter({ hasText: comment }).waitFor();
    await expect.poll(() => card.getByLabel(`Comment on ${siteYear}`, { exact: true }).inputValue(), { timeout: 10_000 }).toBe("");

    await rpage.getByRole("button", { name: "Return to the curator" }).click();
    await rpage.getByLabel("Comment for the curator", { exact: true }).fill(`See the comment on ${siteYear}.`);
    await rpage.getByRole("button", { name: "Confirm: return to the curator" }).click();
    await rpage.getByText("Draft", { exact: true }).filter({ visible: true }).first().waitFor();

    // The curator finds the comment beside the site-year, marks it dealt with and submits again.
    const curatorCtx = await newContext(browser, desktop);
    const page = await signIn(curatorCtx, "curator@plotbank.test");
    const problems = watchPage(page);
    // The return's comment heads the version desk; the site-year's comment sits beside it in the review panel.
    await page.getByText("Reviewer's comment", { exact: true }).waitFor();
    await page.getByText(`See the comment on ${siteYear}.`, { exact: true }).waitFor();
    await openReview(page);
    const own = page.getByTestId(`site-year-${siteYear}`);
    await own.getByTestId("review-comment").filter({ hasText: comment }).waitFor();
    await expect(own.getByLabel(`Comment on ${siteYear}`, { exact: true }).count()).resolves.toBe(0);
    await own.getByRole("button", { name: `Mark the comment on ${siteYear} as dealt with` }).click();
    await own.getByText(/dealt with \(Demo Curator\)/).waitFor();
    await screenshot(page, "review-screen-curator-desktop");
    await page.getByRole("button", { name: "Submit for review" }).click();
    await page.getByLabel("Changelog", { exact: true }).fill("Adds the 2025 season; block 2 checked against the field book.");
    await page.getByRole("button", { name: "Confirm: submit for review" }).click();
    await page.getByText("In review", { exact: true }).filter({ visible: true }).first().waitFor();

    // The comment stayed through the return and the re-submission; the reviewer approves.
    await rpage.goto(`${server.url}/curate/versions/${versionId}`);
    await openReview(rpage);
    await rpage.getByTestId(`site-year-${siteYear}`).getByTestId("review-comment").filter({ hasText: comment }).waitFor();
    await rpage.getByRole("button", { name: "Approve and publish" }).click();
    await rpage.getByRole("button", { name: "Confirm: approve and publish" }).click();
    await rpage.getByText("Published", { exact: true }).filter({ visible: true }).first().waitFor();

    const detail = versionDetail.parse(await (await rpage.request.get(`${server.url}/api/v1/curation/versions/${versionId}`)).json());
    expect(detail.state).toBe("published");
    const kept = reviewComments.parse(
      await (await rpage.request.get(`${server.url}/api/v1/curation/versions/${versionId}/comments`)).json(),
    );
    expect(kept.items.map((c) => c.body)).toEqual([comment]);
    expect(rproblems).toEqual([]);
    expect(problems).toEqual([]);
    await reviewerCtx.close();
    await curatorCtx.close();
  }, 240_000);
});
