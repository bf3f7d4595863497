import type { AppContext } from "@/server/context";
import { schemaOrgDataset } from "./schema-org-dataset";
import type { PageAnswer } from "@/server/web";

const datasetPath = /^\/datasets\/([a-z0-9]+(?:-[a-z0-9]+)*)\/?$/;

const escapeHtml = (s: string) => s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);

/**
 * JSON inside a <script> element: `<` becomes \u003c, so no "</script" (in any letter case) or "<!--" can end
 * the element early; U+2028/2029 are escaped for old parsers. The JSON value is unchanged.
 */
export function scriptSafeJson(value: unknown): string {
  return JSON.stringify(value)
    .replace(/</g, "\\u003c")
    .replace(/>/g, "\\u003e")
    .replace(/&/g, "\\u0026")
    .replace(/\u2028/g, "\\u2028")
    .replace(/\u2029/g, "\\u2029");
}

function shorten(text: string, max = 300): string {
  const flat = text.replace(/\s+/g, " ").trim();
  return flat.length <= max ? flat : `${flat.slice(0, max - 1).replace(/\s+\S*$/, "")}…`;
}

/**
 * The index.html transform: a dataset page gets its title, meta description and schema.org Dataset JSON-LD in
 * the served HTML, so crawlers that run no JavaScript still see them; `?version=` picks the version described.
 * Every other path is served unchanged.
 */
export function datasetPageHead(ctx: AppContext) {
  return async (html: string, url: string): Promise<PageAnswer> => {
    const { pathname, searchParams } = new URL(url, "http://localhost");
    const slug = datasetPath.exec(pathname)?.[1];
    if (!slug) return html;
    // A version's DOI resolves to ?version=X: that page describes that version, withdrawn or not.
    const found = await schemaOrgDataset(ctx, slug, searchParams.get("version") ?? undefined);
    // No published dataset (or version) of that name: the app still draws its not-found state, with status 404.
    if (!found) return { html, found: false };
    const { version, pinned } = found;
    const title = `${version.title} (version ${version.semver}${version.state === "withdrawn" ? ", withdrawn" : ""}) · Plotbank`;
    const head =
      `<title>${escapeHtml(title)}</title>\n` +
      `    <meta data-rh="true" name="description" content="${escapeHtml(shorten(version.description))}" />\n` +
      `    <link rel="canonical" href="${escapeHtml(pinned ? version.landingUrl : found.dataset.landingUrl)}" />\n` +
      `    <script type="application/ld+json">${scriptSafeJson(found.jsonLd)}</script>`;
    // The dataset's description takes the place of the site's.
    const page = html.replace(/<meta [^>]*name="description"[^>]*>\s*/, "");
    return /<title>[\s\S]*?<\/title>/.test(page)
      ? page.replace(/<title>[\s\S]*?<\/title>/, () => head)
      : page.replace("</head>", () => `${head}\n</head>`);
  };
}
