import type { Router } from "express";
import { z } from "zod";
import type { AppContext } from "@/server/context";
import { notFound } from "@/server/errors";
import { routeModule } from "@/server/openapi/define-route";
import { problemResponses } from "@/server/openapi/registry";
import { findVersion, loadCitableDataset } from "@/server/services/citation/citable-version";
import { citationExtensions, citationFormats, citationMediaTypes, renderCitation } from "@/server/services/citation/citation-formats";
import { cslItem } from "@/server/services/citation/csl-item";

const citationParams = z.object({
  slug: z.string().regex(/^[a-z0-9]+(-[a-z0-9]+)*$/),
  semver: z.union([z.string().regex(/^\d+\.\d+\.\d+$/), z.literal("latest")]),
});
const citationQuery = z
  .object({ format: z.enum(citationFormats).default("text").describe("text (APA style), bibtex, ris or csl-json") })
  .strict();

export function citationRoutes(ctx: AppContext): Router {
  const { db, config, registry } = ctx;
  const { router, defineRoute } = routeModule(registry);

  defineRoute(
    {
      method: "get",
      path: "/api/v1/datasets/{slug}/versions/{semver}/citation",
      operationId: "getCitation",
      tags: ["Citations"],
      summary: "How to cite a published version: plain text (APA style), BibTeX, RIS or CSL-JSON",
      description:
        "Every format renders from the same CSL-JSON record. The DOI appears once the DOI service has registered it; " +
        "until then the citation points at the version's stable page. `latest` names the newest published version.",
      params: citationParams,
      query: citationQuery,
      responses: {
        200: {
          description: "The citation",
          content: {
            "text/plain": { schema: z.string() },
            "application/x-bibtex": { schema: z.string() },
            "application/x-research-info-systems": { schema: z.string() },
            "application/vnd.citationstyles.csl+json": { schema: z.array(z.record(z.string(), z.unknown())) },
          },
        },
        ...problemResponses(400, 404, 429),
      },
    },
    async ({ params: { slug, semver }, query: { format } }, _req, res) => {
      const dataset = await loadCitableDataset(db, config, slug);
      if (!dataset) throw notFound(`No published dataset is called "${slug}".`);
      const version = findVersion(dataset, semver);
      if (!version) throw notFound(`Dataset "${slug}" has no published version ${semver}.`);
      const body = renderCitation(cslItem(version, dataset.slug), format);
      res
        .status(200)
        .set("Cache-Control", "public, max-age=300")
        .set("Content-Disposition", `inline; filename="${dataset.slug}-v${version.semver}.${citationExtensions[format]}"`)
        .type(`${citationMediaTypes[format]}; charset=utf-8`)
        .send(body);
    },
  );

  return router;
}
