import { Router } from "express";
import type { AppContext } from "@/server/context";
import { healthRoutes } from "./health";
import { accountRoutes } from "./accounts";
import { publicRoutes } from "./public";
import { tokenRoutes } from "./tokens";
import { citationRoutes } from "./public/citations";
import { catalogRoutes } from "./public/catalog";
import { analysisRoutes } from "./analyses";
import { curationRoutes } from "./curation";

/** Every API route module, mounted under /api/v1. Each documents itself in the registry as it is built. */
export function apiRoutes(ctx: AppContext): Router {
  const router = Router();
  router.use(healthRoutes(ctx));
  router.use(accountRoutes(ctx));
  router.use(publicRoutes(ctx));
  router.use(tokenRoutes(ctx));
  router.use(analysisRoutes(ctx));
  router.use(citationRoutes(ctx));
  router.use(catalogRoutes(ctx));
  router.use(curationRoutes(ctx));
  return router;
}
