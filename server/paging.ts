import { createHash } from "node:crypto";
import { HttpProblem } from "./errors";

/**
 * Cursor paging. A page token is base64url of the last row id and a hash of what was asked (the resource, the
 * versions read and the filters), so a token used with other filters, or after a new version was published, is
 * refused rather than silently skipping or repeating rows.
 */
export function queryHash(parts: readonly unknown[]): string {
  return createHash("sha256").update(JSON.stringify(parts)).digest("base64url").slice(0, 16);
}

export function encodePageToken(afterId: number, hash: string): string {
  return Buffer.from(`${afterId}.${hash}`, "utf8").toString("base64url");
}

const invalidToken = (message: string) =>
  new HttpProblem(400, "Bad request", "The page token is not valid for this request.", { errors: [{ field: "query.pageToken", message }] });

/** The id after which the next page starts (0 without a token). */
export function decodePageToken(token: string | undefined, hash: string): number {
  if (!token) return 0;
  const decoded = Buffer.from(token, "base64url").toString("utf8");
  const match = /^(\d{1,15})\.([\w-]{16})$/.exec(decoded);
  if (!match) throw invalidToken("not a token this API issued");
  if (match[2] !== hash) throw invalidToken("it belongs to other filters, or the data changed since; start again without pageToken");
  return Number(match[1]);
}

/** The URL of the next page: the same query with pageToken replaced. */
export function nextPageUrl(base: string, query: Record<string, unknown>, token: string): string {
  const params = new URLSearchParams();
  for (const [key, value] of Object.entries(query)) {
    if (key === "pageToken" || value === undefined) continue;
    for (const v of Array.isArray(value) ? value : [value]) params.append(key, String(v));
  }
  params.set("pageToken", token);
  return `${base}?${params.toString()}`;
}
