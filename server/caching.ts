import { createHash } from "node:crypto";
import type { Request, Response } from "express";

/**
 * HTTP caching of published data. A published version never changes, so a version-pinned URL is cached for a year
 * and marked immutable; `latest` and cross-dataset reads may move to a new version, so they are cached briefly.
 * ETags are strong: the hash of the version ids read and the normalised query, known before any row is read.
 */
export type Freshness = "pinned" | "moving";

export function strongEtag(parts: readonly unknown[]): string {
  return `"${createHash("sha256").update(JSON.stringify(parts)).digest("base64url").slice(0, 27)}"`;
}

function matches(header: string | undefined, etag: string): boolean {
  if (!header) return false;
  if (header.trim() === "*") return true;
  // If-None-Match uses weak comparison (RFC 9110 §13.1.2), so W/"x" matches "x".
  return header.split(",").some((tag) => tag.trim().replace(/^W\//, "") === etag);
}

/**
 * Set the caching headers; answers 304 and returns true when the client's copy is current, so the caller can skip
 * the database entirely.
 */
export function cacheable(req: Request, res: Response, etag: string, freshness: Freshness): boolean {
  res.setHeader("ETag", etag);
  res.setHeader("Cache-Control", freshness === "pinned" ? "public, max-age=31536000, immutable" : "public, max-age=60");
  res.vary("Accept");
  if (matches(req.headers["if-none-match"], etag)) {
    res.status(304).end();
    return true;
  }
  return false;
}
