import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { appRoutes } from "@/server/app-routes";
import {
  axeVersion,
  axeViolations,
  desktop,
  launchBrowser,
  newContext,
  phone,
  startServer,
  watchPage,
  type RunningServer,
} from "./harness";
import { openScreen, screenFixture, screenVisits, signInAs, type ScreenFixture } from "./page-screens";

/**
 * Every screen of the web app, at phone and desktop size, signed out or as the role that sees it:
 * - axe-core (the version pinned in package.json), injected into the rendered page, reports no violation of any rule
 *   it runs by default (WCAG 2.0–2.2 A and AA, and its best practices: landmarks, heading order, a visible label
 *   inside the accessible name, …);
 * - the document has its own title, "<the screen's h1> · Plotbank", and one non-empty meta description;
 * - there is exactly one h1, and every other heading is h2–h6 (axe checks that no level is skipped);
 * - the console shows no error and the page sees no Content-Security-Policy violation.
 */
/** What the document says about itself once the screen has drawn. */
const pageFacts = (page: Page) =>
  page.evaluate(() => ({
    title: document.title,
    h1: [...document.querySelectorAll("h1")].map((h) => h.textContent?.trim() ?? ""),
    descriptions: [...document.querySelectorAll('meta[name="description"]')].map((m) => m.getAttribute("content") ?? ""),
    cspViolations: (window as unknown as { __cspViolations: string[] }).__cspViolations,
  }));

let server: RunningServer;
let browser: Browser;
let fx: ScreenFixture;
const titles = new Map<string, string>();
beforeAll(async () => {
  server = await startServer();
  fx = await screenFixture(server);
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

it("the list of visited screens covers every route file in app/", () => {
  const visited = new Set(screenVisits.map((v) => v.route));
  expect(
    appRoutes()
      .map((r) => r.file)
      .filter((f) => !visited.has(f)),
  ).toEqual([]);
  expect(visited.has("+not-found")).toBe(true);
});

describe.each([
  ["phone", phone],
  ["desktop", desktop],
])(`at %s size (axe-core ${axeVersion})`, (_size, viewport) => {
  it.each(screenVisits.map((v) => [`${v.route}${v.as ? ` as ${v.as}` : ""}`, v] as const))("%s", async (_name, visit) => {
    const context = await newContext(browser, viewport);
    await context.addInitScript(() => {
      const seen: string[] = [];
      (window as unknown as { __cspViolations: string[] }).__cspViolations = seen;
      document.addEventListener("securitypolicyviolation", (e) =>
        seen.push(`${e.violatedDirective} blocked ${e.blockedURI || "(inline)"}`),
      );
    });
    if (visit.as) await signInAs(context, server.url, visit.as);
    const page = await context.newPage();
    const problems = watchPage(page);
    await openScreen(page, `${server.url}${await visit.path(fx)}`);
    const violations = await axeViolations(page);
    const facts = await pageFacts(page);
    await context.close();

    expect
      .soft(
        violations.map((v) => `${v.id} (${v.impact}): ${v.nodes.map((n) => n.html).join(" | ")}`),
        "axe-core violations",
      )
      .toEqual([]);
    expect.soft(facts.h1, "exactly one h1").toHaveLength(1);
    // "<h1> · Plotbank"; a dataset page adds the version it shows: "<h1> (version 1.1.1) · Plotbank".
    const h1 = (facts.h1[0] ?? "").replace(/[.*+?^${}()|[\]\\]/g, "\\$&");
    expect.soft(facts.title, "the document title names the screen").toMatch(new RegExp(`^${h1}( \\(version [^)]+\\))? · Plotbank$`));
    expect.soft(facts.descriptions.length, "one meta description").toBe(1);
    expect.soft(facts.descriptions[0]?.length ?? 0, "a meta description with words in it").toBeGreaterThan(40);
    expect.soft(facts.cspViolations, "Content-Security-Policy violations").toEqual([]);
    // The not-found screen's own document is answered 404 (for crawlers), and Chromium logs that one.
    const expected =
      visit.route === "+not-found" ? ["console error: Failed to load resource: the server responded with a status of 404 (Not Found)"] : [];
    expect.soft(problems, "console errors").toEqual(expected);
    // Different screens have different titles (the same screen seen by two roles shares one).
    const earlier = [...titles].find(([route, title]) => title === facts.title && route !== visit.route);
    expect.soft(earlier?.[0], `another screen already has the title "${facts.title}"`).toBeUndefined();
    titles.set(visit.route, facts.title);
  });
});
