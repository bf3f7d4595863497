import { createHash } from "node:crypto";
import { existsSync, readFileSync } from "node:fs";
import path from "node:path";
import express, { type Express } from "express";
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
  const indexHtml = readFileSync(indexPath, "utf8").replace('<meta name="description"', '<meta data-rh="true" name="description"');
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
  app.get("/{*splat}", async (req, res, next) => {
    if (req.path.startsWith("/api/")) return next();
    try {
      // The whole URL: a page may depend on its query (a dataset page on ?version=).
      const page = transformIndex ? await transformIndex(indexHtml, req.originalUrl) : indexHtml;
      const { html, found } = typeof page === "string" ? { html: page, found: true } : page;
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
