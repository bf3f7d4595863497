import type { Router } from "express";
import { z } from "zod";
import { semver } from "@/schemas/curation";
import { resourceName } from "@/schemas/table-schema";
import type { AppContext } from "@/server/context";
import { routeModule } from "@/server/openapi/define-route";
import { problemResponse, problemResponses } from "@/server/openapi/registry";
import { buildResource, dataPackageDescriptor, dataPackageZip, publishedVersion } from "@/server/services/curation/data-package";
import { resourceOrder } from "@/server/services/curation/resource-csv";

const versionParams = z.object({ slug: z.string().min(1).max(120), semver: z.union([semver, z.literal("latest")]) });
const resourceParams = versionParams.extend({ resource: resourceName });
const immutable = "public, max-age=31536000, immutable";
/** A withdrawn version's files are gone: a problem that names the reason. */
const withdrawn = problemResponse(410, "Withdrawn (tombstone): the problem gives the reason");

export function curationExportRoutes(ctx: AppContext): Router {
  const { db, registry, config } = ctx;
  const { router, defineRoute } = routeModule(registry);
  const base = (slug: string, v: string) => `/api/v1/datasets/${slug}/versions/${v}`;

  defineRoute(
    {
      method: "get",
      path: "/api/v1/datasets/{slug}/versions/{semver}/datapackage.zip",
      operationId: "getDataPackageZip",
      tags: ["Downloads"],
      summary: "A published version as a Frictionless Data Package (datapackage.json + one CSV per resource); `latest` works as semver",
      params: versionParams,
      responses: {
        200: { description: "The zip", content: { "application/zip": { schema: z.string() } } },
        ...withdrawn,
        ...problemResponses(404),
      },
    },
    async ({ params: { slug, semver: v } }, req, res) => {
      const { dataset, version } = await publishedVersion(db, slug, v);
      const etag = `"${version.checksum?.replace("sha256:", "") ?? version.id}-zip"`;
      res.set({ ETag: etag, "Cache-Control": v === "latest" ? "public, max-age=60" : immutable });
      if (req.headers["if-none-match"] === etag) return void res.status(304).end();
      const stream = await dataPackageZip(db, config.publicUrl, dataset, version);
      res.type("application/zip").attachment(`${dataset.slug}-${version.semver}.zip`);
      stream.pipe(res);
    },
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/datasets/{slug}/versions/{semver}/datapackage.json",
      operationId: "getDataPackageDescriptor",
      tags: ["Downloads"],
      summary:
        "The Data Package descriptor of a published version (schemas, hashes, sizes); each resource's path is the absolute URL of its CSV, so the descriptor works from its own address",
      params: versionParams,
      responses: {
        200: { description: "datapackage.json", content: { "application/json": { schema: z.record(z.string(), z.unknown()) } } },
        ...withdrawn,
        ...problemResponses(404),
      },
    },
    async ({ params: { slug, semver: v } }, _req, res) => {
      const { dataset, version } = await publishedVersion(db, slug, v);
      const built = [];
      for (const r of resourceOrder) built.push(await buildResource(db, version, r));
      res
        .set("Cache-Control", v === "latest" ? "public, max-age=60" : immutable)
        .json(dataPackageDescriptor(config.publicUrl, dataset, version, built, { paths: "absolute" }));
    },
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/datasets/{slug}/versions/{semver}/resources/{resource}.csv",
      operationId: "getResourceCsv",
      tags: ["Downloads"],
      summary:
        "One resource of a published version as CSV, with `Digest: sha-256=…`, a strong ETag and a describedby link to datapackage.json",
      params: resourceParams,
      responses: {
        200: { description: "The CSV", content: { "text/csv": { schema: z.string() } } },
        304: { description: "Not modified" },
        ...withdrawn,
        ...problemResponses(404),
      },
    },
    async ({ params: { slug, semver: v, resource } }, req, res) => {
      const { dataset, version } = await publishedVersion(db, slug, v);
      const built = await buildResource(db, version, resource);
      const etag = `"${built.sha256}"`;
      res.set({
        ETag: etag,
        Digest: `sha-256=${Buffer.from(built.sha256, "hex").toString("base64")}`,
        "Repr-Digest": `sha-256=:${Buffer.from(built.sha256, "hex").toString("base64")}:`,
        Link: `<${base(dataset.slug, version.semver)}/datapackage.json>; rel="describedby"; type="application/json"`,
        "Cache-Control": v === "latest" ? "public, max-age=60" : immutable,
      });
      if (req.headers["if-none-match"] === etag) return void res.status(304).end();
      res.type("text/csv; charset=utf-8").attachment(`${dataset.slug}-${version.semver}-${resource}.csv`).send(built.csv);
    },
  );

  return router;
}
