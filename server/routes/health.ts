import { sql } from "drizzle-orm";
import type { Router } from "express";
import { health, readiness, type Health, type Readiness } from "@/schemas/dataset";
import { migrationsApplied } from "@/db/client";
import type { AppContext } from "@/server/context";
import { routeModule } from "@/server/openapi/define-route";

export function healthRoutes({ db, database, registry, config, jobs }: AppContext): Router {
  const { router, defineRoute } = routeModule(registry);

  defineRoute(
    {
      method: "get",
      path: "/api/v1/health",
      operationId: "getHealth",
      tags: ["Service"],
      summary: "Database connectivity and the application version",
      responses: {
        200: { description: "Healthy", content: { "application/json": { schema: health } } },
        503: { description: "The database does not answer", content: { "application/json": { schema: health } } },
      },
    },
    async (_input, _req, res) => {
      const started = performance.now();
      let connected = true;
      try {
        await db.execute(sql`select 1`);
      } catch {
        connected = false;
      }
      const body: Health = {
        status: connected ? "ok" : "degraded",
        version: config.version,
        database: { kind: database.kind, connected, latencyMs: Math.round((performance.now() - started) * 100) / 100 },
      };
      res
        .set("Cache-Control", "no-store")
        .status(connected ? 200 : 503)
        .json(body);
    },
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/health/ready",
      operationId: "getReadiness",
      tags: ["Service"],
      summary: "Whether this process should be sent traffic: database reachable, migrations applied, job queue running",
      responses: {
        200: { description: "Ready", content: { "application/json": { schema: readiness } } },
        503: {
          description: "Not ready (starting, stopping, or the database is behind)",
          content: { "application/json": { schema: readiness } },
        },
      },
    },
    async (_input, _req, res) => {
      let connected = true;
      let migrated = false;
      try {
        await db.execute(sql`select 1`);
        migrated = await migrationsApplied(database);
      } catch {
        connected = false;
      }
      const checks = { database: connected, migrations: migrated, jobQueue: jobs.running() };
      const body: Readiness = { ready: checks.database && checks.migrations && checks.jobQueue, checks, jobQueue: jobs.kind };
      res
        .set("Cache-Control", "no-store")
        .status(body.ready ? 200 : 503)
        .json(body);
    },
  );

  return router;
}
