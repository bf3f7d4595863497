import { createHash } from "node:crypto";
import { existsSync, readFileSync } from "node:fs";
import path from "node:path";
import express, { type Express, type RequestHandler } from "express";
import { webFontCss } from "@/constants/web-fonts";
import { evidenceStateFromParams, metaApiPath } from "@/lib/share-link";
import { appRouteMatcher } from "./app-routes";

export const webDistDir = path.resolve(__dirname, "../dist");

/**
 * CSP source expressions ('sha256-…') for the inline scripts of a page: every <script> without src whose type is
 * JavaScript (none, text/javascript or module). Data blocks such as application/ld+json are not scripts to a browser.
 */
function inlineScriptHashes(html: string): string[] {
  const hashes: string[] = [];
  for (const m of html.matchAll(/<script\b([^>]*)>([\s\S]*?)<\/script>/gi)) {
    const attributes = m[1] ?? "";
    if (/\bsrc\s*=/i.test(attributes)) continue;
    const type = /\btype\s*=\s*["']?([^"'\s>]+)/i.exec(attributes)?.[1]?.toLowerCase();
    if (type && type !== "text/javascript" && type !== "module" && type !== "application/javascript") continue;
    hashes.push(
      `'sha256-${createHash("sha256")
        .update(m[2] ?? "", "utf8")
        .digest("base64")}'`,
    );
  }
  return hashes;
}

/**
 * The Evidence screen (`/`) asks for one analysis, named by the page's own query: a preload link lets the browser
 * send that request with the HTML instead of after the JavaScript has arrived and run, which on a slow link is
 * seconds earlier. The app's fetch of the same URL (same credentials mode) picks up the preloaded answer.
 */
function evidencePreload(originalUrl: string): string {
  const url = new URL(originalUrl, "http://page.invalid");
  const params: Record<string, string> = {};
  for (const [key, value] of url.searchParams) params[key] = value;
  const href = metaApiPath(evidenceStateFromParams(params)).replace(/&/g, "&amp;").replace(/"/g, "&quot;");
  return `<link rel="preload" as="fetch" crossorigin="use-credentials" href="${href}">`;
}

/** The page to serve: index.html as a transform left it, and whether what the address names exists (else 404). */
export type PageAnswer = string | { html: string; found: boolean };

/**
 * Serve the exported Expo web app. Hashed bundles are cached for a year; every other path that is not a file gets
 * index.html, so a deep link (a shared analysis, a dataset page) works on reload. A path that no route file in app/
 * matches still gets the app, which draws its not-found screen, but with status 404.
 * Returns the CSP hashes of index.html's inline scripts, for the script-src directive.
 */
export function mountWebApp(
  app: Express,
  distDir = webDistDir,
  transformIndex?: (html: string, url: string) => Promise<PageAnswer> | PageAnswer,
  isScreen: (pathname: string) => boolean = appRouteMatcher(),
  /** Run before each page is sent (the app cookie, server/auth/app-cookie.ts). */
  pageHandlers: RequestHandler[] = [],
): string[] {
  const indexPath = path.join(distDir, "index.html");
  if (!existsSync(indexPath)) {
    app.get("/", (_req, res) => {
      res
        .status(503)
        .type("text/plain")
        .send("The web app has not been built yet. Run `npm run build:web`, or start with `npm start`, which builds it.");
    });
    return [];
  }
  // data-rh marks the description as expo-router/head's (as its server rendering does), so each screen's own replaces
  // it in the browser instead of adding a second one.
  // The fonts' @font-face rules go into the page itself (font-display: swap, constants/web-fonts.ts).
  const indexHtml = readFileSync(indexPath, "utf8")
    .replace('<meta name="description"', '<meta data-rh="true" name="description"')
    .replace("</head>", `<style id="web-fonts">${webFontCss}</style></head>`);
  app.use(
    express.static(distDir, {
      index: false,
      setHeaders(res, filePath) {
        if (filePath.includes(`${path.sep}_expo${path.sep}`) || filePath.includes(`${path.sep}assets${path.sep}`)) {
          res.setHeader("Cache-Control", "public, max-age=31536000, immutable");
        }
      },
    }),
  );
  app.get("/{*splat}", ...pageHandlers, async (req, res, next) => {
    if (req.path.startsWith("/api/")) return next();
    try {
      // The whole URL: a page may depend on its query (a dataset page on ?version=).
      const page = transformIndex ? await transformIndex(indexHtml, req.originalUrl) : indexHtml;
      const answer = typeof page === "string" ? { html: page, found: true } : page;
      const found = answer.found;
      const html = req.path === "/" ? answer.html.replace("</head>", `${evidencePreload(req.originalUrl)}</head>`) : answer.html;
      res.setHeader("Cache-Control", "no-cache");
      res
        .status(found && isScreen(req.path) ? 200 : 404)
        .type("html")
        .send(html);
    } catch (error) {
      next(error);
    }
  });
  return inlineScriptHashes(indexHtml);
}
