import compression from "compression";
import cookieParser from "cookie-parser";
import express, { type Express, type RequestHandler } from "express";
import helmet from "helmet";
import type { Database } from "@/db/client";
import { appCookieOnApi, appCookieOnPages } from "./auth/app-cookie";
import { authenticate } from "./auth/authenticate";
import { csrfGuard } from "./auth/csrf";
import { crawlerRoutes } from "./crawlers";
import { publicReadCors } from "./cors";
import type { AppConfig } from "./config";
import type { AppContext } from "./context";
import { notFoundHandler, problemMiddleware } from "./errors";
import { createJobQueue } from "./jobs";
import { mountApiDocs } from "./openapi/docs";
import { createRegistry, generateOpenApiDocument } from "./openapi/registry";
import { apiRateLimits, pageRateLimit } from "./rate-limit";
import { rateLimitStores } from "./rate-limit-store";
import { apiRoutes } from "./routes";
import { datasetPageHead } from "./services/linked-data/dataset-page-head";
import { registerPublishHooks } from "./services/publish-hook-setup";
import { mountWebApp } from "./web";

export interface CreateAppOptions {
  database: Database;
  config: AppConfig;
  /** Serve the exported web app from this folder; false for API-only apps (tests). */
  webDistDir?: string | false;
  /** Runs first on every API request (tests check each answer against the OpenAPI document here). */
  apiObserver?: RequestHandler;
}

/** Build the Express app. It does not listen: server/main.ts does, and tests drive it through supertest. */
export function createApp({ database, config, webDistDir, apiObserver }: CreateAppOptions): { app: Express; ctx: AppContext } {
  const registry = createRegistry();
  const base = { database, db: database.db, config, registry, rateLimitStores: rateLimitStores(database) };
  const ctx: AppContext = { ...base, jobs: createJobQueue(base) };
  registerPublishHooks();
  const app = express();
  app.disable("x-powered-by");
  // X-Forwarded-For is believed only from the proxies PLOTBANK_TRUST_PROXY names; by default from nobody.
  app.set("trust proxy", config.trustProxy);
  app.set("etag", "strong");

  // Hashes of the inline scripts of the web export's index.html, known once it is mounted (below).
  let webInlineScripts: string[] = [];
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          defaultSrc: ["'self'"],
          // No inline script runs but one whose hash is listed: the JSON-LD in dataset pages is a data block
          // (application/ld+json), which browsers never execute, and Swagger UI starts from a file.
          scriptSrc: ["'self'", () => webInlineScripts.join(" ")],
          styleSrc: ["'self'", "'unsafe-inline'"],
          imgSrc: ["'self'", "data:", "blob:"],
          fontSrc: ["'self'", "data:"],
          connectSrc: ["'self'"],
          upgradeInsecureRequests: null,
        },
      },
      crossOriginEmbedderPolicy: false,
    }),
  );
  // gzip for anything over 1 KB the client accepts compressed: the web bundle (2 MB → about a quarter), JSON pages and
  // CSV streams (flushed as they go). A phone on a rural network feels every byte.
  app.use(compression({ threshold: 1024 }));
  app.use(cookieParser());

  const api = express.Router();
  if (apiObserver) api.use(apiObserver);
  // The public read API is open to any origin; writes are same-origin only (no CORS for them).
  api.use(publicReadCors());
  api.use(express.json({ limit: "1mb" }));
  api.use(authenticate(ctx.db));
  api.use(appCookieOnApi(config));
  api.use(csrfGuard(config.publicUrl));
  api.use(apiRateLimits(config, ctx.rateLimitStores));
  api.use(apiRoutes(ctx));

  let openApiDocument: ReturnType<typeof generateOpenApiDocument> | undefined;
  const openApi = () => (openApiDocument ??= generateOpenApiDocument(registry, config.version));
  api.get("/openapi.json", (_req, res) => {
    res.set("Cache-Control", "public, max-age=300").json(openApi());
  });
  api.use(notFoundHandler);
  app.use("/api/v1", api);

  mountApiDocs(app, "/api/v1/openapi.json");
  app.use("/api", notFoundHandler);

  app.use(crawlerRoutes(ctx));
  if (webDistDir !== false) {
    app.use("/datasets", pageRateLimit(config, ctx.rateLimitStores));
    webInlineScripts = mountWebApp(app, webDistDir, datasetPageHead(ctx), undefined, appCookieOnPages(config, ctx.rateLimitStores));
  }
  app.use(problemMiddleware);
  return { app, ctx };
}
