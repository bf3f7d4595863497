import { sql } from "drizzle-orm";
import type { IncrementResponse, Options, Store } from "express-rate-limit";
import { queryRows, type Database, type Db } from "@/db/client";

/** How often a store deletes the counters whose window ended (at most; it does so while counting). */
const sweepEveryMs = 60_000;

/**
 * express-rate-limit's counters in PostgreSQL (table rate_limit_hits), so that every Plotbank process on one server
 * counts a client against one quota. Each hit is one atomic upsert: a row whose window has ended starts from one with
 * a new window, any other gains a hit, and the statement returns the count and the window's end. Which client a hit
 * belongs to is the limiter's key generator's business; the store only counts what it is given.
 */
class PostgresRateLimitStore implements Store {
  readonly localKeys = false;
  private windowMs = 60_000;
  private lastSweep = 0;

  constructor(
    private readonly db: Db,
    /** Names the limiter, so two limiters that see the same client key count apart. */
    readonly prefix: string,
  ) {}

  init(options: Options): void {
    this.windowMs = options.windowMs;
  }

  async increment(key: string): Promise<IncrementResponse> {
    this.sweepNowAndThen();
    const [row] = await queryRows<{ hits: number; reset_at: Date | string }>(
      this.db,
      sql`insert into rate_limit_hits as h (key, hits, reset_at)
        values (${this.prefix + key}, 1, now() + make_interval(secs => ${this.windowMs / 1000}))
        on conflict (key) do update set
          hits = case when h.reset_at <= now() then 1 else h.hits + 1 end,
          reset_at = case when h.reset_at <= now() then excluded.reset_at else h.reset_at end
        returning hits, reset_at`,
    );
    return { totalHits: Number(row!.hits), resetTime: new Date(row!.reset_at) };
  }

  async get(key: string): Promise<IncrementResponse | undefined> {
    const [row] = await queryRows<{ hits: number; reset_at: Date | string }>(
      this.db,
      sql`select hits, reset_at from rate_limit_hits where key = ${this.prefix + key} and reset_at > now()`,
    );
    return row ? { totalHits: Number(row.hits), resetTime: new Date(row.reset_at) } : undefined;
  }

  async decrement(key: string): Promise<void> {
    await this.db.execute(
      sql`update rate_limit_hits set hits = greatest(hits - 1, 0) where key = ${this.prefix + key} and reset_at > now()`,
    );
  }

  async resetKey(key: string): Promise<void> {
    await this.db.execute(sql`delete from rate_limit_hits where key = ${this.prefix + key}`);
  }

  async resetAll(): Promise<void> {
    await this.db.execute(sql`delete from rate_limit_hits where starts_with(key, ${this.prefix})`);
  }

  private sweepNowAndThen() {
    if (Date.now() - this.lastSweep < sweepEveryMs) return;
    this.lastSweep = Date.now();
    this.db
      .execute(sql`delete from rate_limit_hits where reset_at < now()`)
      .catch((error: unknown) => console.error("Deleting ended rate-limit windows failed:", error));
  }
}

/** Names a limiter's store: shared counters on PostgreSQL, or undefined for express-rate-limit's memory store. */
export type RateLimitStores = (limiter: string) => Store | undefined;

/**
 * On PostgreSQL every limiter counts in the shared table; on PGlite (one process owns the database) counters stay in
 * memory. A `namespace` keeps apps that share a server apart (each test app, each of several deployments).
 */
export function rateLimitStores(database: Database, namespace = ""): RateLimitStores {
  if (database.kind !== "postgres") return () => undefined;
  return (limiter) => new PostgresRateLimitStore(database.db, `${namespace}${limiter}:`);
}
