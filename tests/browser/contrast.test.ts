import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { desktop, launchBrowser, newContext, phone, startServer, type RunningServer } from "./harness";

/**
 * Text contrast as rendered: every visible text element on the agronomist's screens, against the background it
 * actually sits on, meets WCAG 2.1 AA (success criterion 1.4.3: 4.5:1, or 3:1 for large text of at least 24 px, or
 * 18.66 px bold). Relative luminance and contrast ratio follow the WCAG 2.1 definitions. Disabled controls are
 * exempt, as the criterion says.
 */

interface Failure {
  text: string;
  ratio: number;
  needed: number;
  color: string;
  background: string;
}

async function contrastFailures(page: Page): Promise<{ checked: number; failures: Failure[] }> {
  return page.evaluate(() => {
    const parse = (c: string): [number, number, number, number] => {
      const m = c.match(/rgba?\(([^)]+)\)/);
      if (!m) return [0, 0, 0, 0];
      const [r, g, b, a] = m[1]!
        .split(/[ ,/]+/)
        .filter(Boolean)
        .map(Number);
      return [r!, g!, b!, a === undefined ? 1 : a];
    };
    const over = (top: [number, number, number, number], under: [number, number, number]): [number, number, number] =>
      [0, 1, 2].map((i) => top[i]! * top[3] + under[i]! * (1 - top[3])) as [number, number, number];
    const luminance = ([r, g, b]: [number, number, number]) => {
      const lin = (v: number) => {
        const s = v / 255;
        return s <= 0.04045 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4;
      };
      return 0.2126 * lin(r) + 0.7152 * lin(g) + 0.0722 * lin(b);
    };
    /** The colour behind an element: its ancestors' backgrounds composited from the page (white) up. */
    const backgroundOf = (el: Element): [number, number, number] => {
      const chain: Element[] = [];
      for (let e: Element | null = el; e; e = e.parentElement) chain.push(e);
      let bg: [number, number, number] = [255, 255, 255];
      for (const e of chain.reverse()) {
        const c = parse(getComputedStyle(e).backgroundColor);
        if (c[3] > 0) bg = over(c, bg);
      }
      return bg;
    };
    const failures: Failure[] = [];
    let checked = 0;
    const walker = document.createTreeWalker(document.body, NodeFilter.SHOW_TEXT);
    const seen = new Set<Element>();
    for (let n = walker.nextNode(); n; n = walker.nextNode()) {
      const el = n.parentElement;
      if (!el || seen.has(el) || !n.textContent?.trim()) continue;
      seen.add(el);
      if (el.closest("svg, [aria-disabled='true'], [disabled]")) continue;
      const rect = el.getBoundingClientRect();
      const style = getComputedStyle(el);
      if (rect.width === 0 || rect.height === 0 || style.visibility === "hidden" || Number(style.opacity) === 0) continue;
      const bg = backgroundOf(el);
      const fg = over(parse(style.color), bg);
      const [l1, l2] = [luminance(fg), luminance(bg)].sort((a, b) => b - a);
      const ratio = (l1! + 0.05) / (l2! + 0.05);
      const size = parseFloat(style.fontSize);
      const bold = Number(style.fontWeight) >= 700 || /bold/i.test(style.fontFamily);
      const needed = size >= 24 || (bold && size >= 18.66) ? 3 : 4.5;
      checked++;
      if (ratio < needed) {
        failures.push({
          text: n.textContent.trim().slice(0, 60),
          ratio: Math.round(ratio * 100) / 100,
          needed,
          color: style.color,
          background: `rgb(${bg.map(Math.round).join(", ")})`,
        });
      }
    }
    return { checked, failures };
  });
}

let server: RunningServer;
let browser: Browser;
beforeAll(async () => {
  server = await startServer();
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

const screens: [string, string, string][] = [
  ["Evidence", "/?crop=soybean&nutrient=P&placement=2x2-band", "Mean yield response"],
  ["Datasets", "/datasets", "Datasets"],
  ["a dataset page", "/datasets/soybean-starter-p-placement", "Data dictionary"],
  ["Developers", "/developers", "Example requests"],
  ["Sign in", "/sign-in", "Sign in"],
];

describe.each([
  ["phone", phone],
  ["desktop", desktop],
])("text contrast at %s size", (_name, viewport) => {
  it.each(screens)("%s meets WCAG AA", async (_label, path, marker) => {
    const context = await newContext(browser, viewport);
    const page = await context.newPage();
    await page.goto(`${server.url}${path}`);
    await page.getByText(marker, { exact: false }).first().waitFor();
    await page.waitForLoadState("networkidle");
    const { checked, failures } = await contrastFailures(page);
    expect(checked).toBeGreaterThan(5);
    expect(failures).toEqual([]);
    await context.close();
  });
});
