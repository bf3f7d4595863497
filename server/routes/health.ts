import { sql } from "drizzle-orm";
import type { Router } from "express";
import { health, type Health } from "@/schemas/dataset";
import type { AppContext } from "@/server/context";
import { routeModule } from "@/server/openapi/define-route";

export function healthRoutes({ db, database, registry, config }: AppContext): Router {
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

  return router;
}
