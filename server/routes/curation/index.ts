import { Router } from "express";
import type { AppContext } from "@/server/context";
import { curationDatasetRoutes } from "./datasets";
import { curationDictionaryRoutes } from "./dictionary-fields";
import { curationExportRoutes } from "./exports";
import { curationReviewRoutes } from "./review";
import { curationSiteYearAnovaRoutes } from "./site-year-anova";
import { curationTemplateRoutes } from "./templates";
import { curationUploadRoutes } from "./uploads";
import { curationVersionRoutes } from "./versions";

/** Datasets, drafts, uploads, review and the public downloads of published versions. */
export function curationRoutes(ctx: AppContext): Router {
  const router = Router();
  router.use(curationDatasetRoutes(ctx));
  router.use(curationVersionRoutes(ctx));
  router.use(curationReviewRoutes(ctx));
  router.use(curationDictionaryRoutes(ctx));
  router.use(curationUploadRoutes(ctx));
  router.use(curationTemplateRoutes(ctx));
  router.use(curationExportRoutes(ctx));
  router.use(curationSiteYearAnovaRoutes(ctx));
  return router;
}
