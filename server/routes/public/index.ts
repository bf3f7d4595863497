import { Router } from "express";
import type { AppContext } from "@/server/context";
import { crossDatasetRoutes } from "./cross-dataset";
import { datasetRoutes } from "./datasets";
import { siteYearAnovaRoutes } from "./site-year-anova";
import { versionRowRoutes } from "./version-rows";
import { viewSchemaRoutes } from "./view-schemas";

/** The public read API: catalogue and version metadata, version rows, and rows across datasets. */
export function publicRoutes(ctx: AppContext): Router {
  const router = Router();
  router.use(datasetRoutes(ctx));
  router.use(versionRowRoutes(ctx));
  router.use(crossDatasetRoutes(ctx));
  router.use(siteYearAnovaRoutes(ctx));
  router.use(viewSchemaRoutes(ctx));
  return router;
}
