import { existsSync, mkdirSync, readdirSync, readFileSync, writeFileSync } from "node:fs";
import path from "node:path";
import { gzipSync } from "node:zlib";
import { launchBrowser } from "../tests/browser/harness";
import { startServerProcess } from "./server-process";

/**
 * First-screen JavaScript of the web export: starts the real server (PGlite, demo data, serving dist/), opens `/`
 * (the Evidence screen) in headless Chromium and sums the gzip size of every JavaScript file the page fetched, then
 * opens the site-year table to show what loads later. Build first: `flock /tmp/webbuild.lock npm run build:web`.
 * Writes a Markdown table to stdout and bench/out/bundle.json. Loopback only. Run: node --import tsx bench/bundle.ts
 */

const goalKb = 500;
const distJs = path.resolve(__dirname, "../dist/_expo/static/js/web");

/** gzip at zlib's default level, what a compressing web server would send. */
const gzipKb = (body: Buffer) => gzipSync(body).length / 1024;
const kb = (n: number) => `${n.toFixed(1)} KB`;

async function main() {
  if (!existsSync(path.join(distJs, "..", "..", "..", "..", "index.html")))
    throw new Error("No web export in dist/: run `flock /tmp/webbuild.lock npm run build:web` first.");
  const server = await startServerProcess({ port: 40000 + Math.floor(Math.random() * 20000) });
  const browser = await launchBrowser();
  const loaded = new Map<string, { raw: number; gzip: number }>();
  try {
    const page = await browser.newPage({ viewport: { width: 1280, height: 800 } });
    page.on("response", (res) => {
      const url = new URL(res.url());
      if (!url.pathname.endsWith(".js")) return;
      void res.body().then((body) => loaded.set(path.basename(url.pathname), { raw: body.length / 1024, gzip: gzipKb(body) }));
    });
    await page.goto(`${server.url}/`, { waitUntil: "networkidle" });
    await page.getByText("Share this view").waitFor({ timeout: 60_000 });
    await page.waitForLoadState("networkidle");
    const first = new Map(loaded);
    const openTable = page.getByTestId("open-table");
    await openTable.or(page.getByText("Something went wrong")).first().waitFor({ timeout: 60_000 });
    if (await openTable.isVisible()) {
      await openTable.click();
      await page.getByText("Site-year", { exact: true }).first().waitFor({ timeout: 30_000 });
      await page.waitForLoadState("networkidle");
    } else console.error("The analysis did not render, so the table was not opened:", (await page.locator("body").innerText()).slice(-300));
    const later = [...loaded].filter(([name]) => !first.has(name));

    const sum = (files: [string, { raw: number; gzip: number }][]) =>
      files.reduce((a, [, f]) => ({ raw: a.raw + f.raw, gzip: a.gzip + f.gzip }), { raw: 0, gzip: 0 });
    const firstTotal = sum([...first]);
    const allFiles = readdirSync(distJs).filter((f) => f.endsWith(".js"));
    const whole = allFiles.reduce((a, f) => a + gzipKb(readFileSync(path.join(distJs, f))), 0);
    const rows = [
      ...[...first].map(([name, f]) => `| first screen | ${name} | ${kb(f.raw)} | ${kb(f.gzip)} |`),
      `| **first screen, total** | ${first.size} files | **${kb(firstTotal.raw)}** | **${kb(firstTotal.gzip)}** |`,
      ...later.map(([name, f]) => `| on opening the site-year table | ${name} | ${kb(f.raw)} | ${kb(f.gzip)} |`),
      `| whole export | ${allFiles.length} files | – | ${kb(whole)} |`,
    ];
    const met = firstTotal.gzip <= goalKb;
    console.log(["| when | file | raw | gzip |", "|---|---|---|---|", ...rows].join("\n"));
    console.log(`\nFirst-screen JavaScript: ${kb(firstTotal.gzip)} gzip (goal ≤ ${goalKb} KB: ${met ? "met" : "missed"}).`);
    const out = path.resolve(__dirname, "out");
    mkdirSync(out, { recursive: true });
    writeFileSync(
      path.join(out, "bundle.json"),
      JSON.stringify(
        {
          node: process.version,
          at: new Date().toISOString(),
          goalKb,
          firstScreen: Object.fromEntries(first),
          firstScreenGzipKb: firstTotal.gzip,
          later: Object.fromEntries(later),
          wholeExportGzipKb: whole,
        },
        null,
        2,
      ),
    );
    if (!met) process.exitCode = 1;
  } finally {
    await browser.close();
    await server.stop();
  }
}

void main().catch((err: unknown) => {
  console.error(err);
  process.exit(1);
});
