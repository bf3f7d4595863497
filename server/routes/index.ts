import { Router } from "express";
import type { AppContext } from "@/server/context";
import { healthRoutes } from "./health";
import { sessionRoutes } from "./accounts/session";
import { datasetRoutes } from "./public/datasets";

/** Every API route module, mounted under /api/v1. Each documents itself in the registry as it is built. */
export function apiRoutes(ctx: AppContext): Router {
  const router = Router();
  router.use(healthRoutes(ctx));
  router.use(sessionRoutes(ctx));
  router.use(datasetRoutes(ctx));
  return router;
}
