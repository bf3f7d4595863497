import pg from "pg";

/** A database of its own on the server that BENCH_DATABASE_URL (an admin connection) names, and its drop. */
export async function scratchDatabase(prefix: string): Promise<{ url: string; drop(): Promise<void> }> {
  const adminUrl = process.env.BENCH_DATABASE_URL;
  if (!adminUrl)
    throw new Error("Set BENCH_DATABASE_URL to an admin connection of a PostgreSQL server (a database is created and dropped).");
  const name = `${prefix}_${Date.now().toString(36)}`;
  const admin = new pg.Client({ connectionString: adminUrl });
  await admin.connect();
  await admin.query(`CREATE DATABASE ${name}`);
  const url = new URL(adminUrl);
  url.pathname = `/${name}`;
  return {
    url: url.toString(),
    async drop() {
      await admin.query(`DROP DATABASE IF EXISTS ${name} WITH (FORCE)`);
      await admin.end();
    },
  };
}
