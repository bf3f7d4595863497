import type { Database, Db } from "@/db/client";
import type { AppConfig } from "./config";
import type { JobQueue } from "./jobs/queue";
import type { RateLimitStores } from "./rate-limit-store";
import type { Registry } from "./openapi/registry";

/** What every route module receives: the database, the configuration and the OpenAPI registry to document itself in. */
export interface AppContext {
  database: Database;
  db: Db;
  config: AppConfig;
  registry: Registry;
  /** Background work: DOI registration and mail delivery (server/jobs). */
  jobs: JobQueue;
  /** Where rate limiters count: PostgreSQL, shared by all processes, or each limiter's memory (PGlite). */
  rateLimitStores: RateLimitStores;
}
