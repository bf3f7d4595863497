import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { sql } from "drizzle-orm";
import { openDatabase } from "@/db/client";
import { demoPassword } from "@/datasets";
import type { AppContext } from "@/server/context";
import { versionFingerprint } from "@/tests/support/version-fingerprint";
import { startServerProcess, type ServerProcess } from "./server-process";

/**
 * Crash safety: SIGKILL the server in the middle of a large import and in the middle of a publish, restart it, and
 * check that published versions are unchanged (fingerprints over every row), the interrupted draft is whole or
 * absent, and the server starts cleanly. Each scenario is repeated with different kill delays.
 */
const rounds = Number(process.env.CRASH_ROUNDS ?? 3);
const port = 18600;
const work = mkdtempSync(path.join(tmpdir(), "plotbank-crash-"));
const dataDir = path.join(work, "pglite");

type Row = Record<string, unknown>;
async function withDb<T>(fn: (ctx: AppContext) => Promise<T>): Promise<T> {
  const database = await openDatabase({ dataDir });
  try {
    return await fn({ db: database.db, database } as unknown as AppContext);
  } finally {
    await database.close();
  }
}
const rows = async (ctx: AppContext, q: ReturnType<typeof sql>) => ((await ctx.db.execute(q)) as unknown as { rows: Row[] }).rows;

async function publishedFingerprints(): Promise<Record<string, string>> {
  return withDb(async (ctx) => {
    const out: Record<string, string> = {};
    for (const v of await rows(ctx, sql`select id from versions where state = 'published' order by id`))
      out[String(v.id)] = await versionFingerprint(ctx, String(v.id));
    return out;
  });
}

async function signIn(server: ServerProcess, email: string): Promise<string> {
  const res = await fetch(`${server.url}/api/v1/session`, {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify({ email, password: demoPassword }),
  });
  if (!res.ok) throw new Error(`sign-in ${email}: ${res.status} ${await res.text()}`);
  return res.headers.get("set-cookie")!.split(";")[0]!;
}

async function call(server: ServerProcess, cookie: string, method: string, p: string, body?: unknown) {
  const res = await fetch(server.url + p, {
    method,
    headers: { cookie, "content-type": "application/json", origin: server.url },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  const text = await res.text();
  if (!res.ok) throw new Error(`${method} ${p}: ${res.status} ${text.slice(0, 500)}`);
  return JSON.parse(text) as Row;
}

async function uploadCsv(server: ServerProcess, cookie: string, versionId: string, resource: string, csv: string) {
  const form = new FormData();
  form.append("file", new Blob([csv], { type: "text/csv" }), `${resource}.csv`);
  return fetch(`${server.url}/api/v1/curation/versions/${versionId}/uploads/${resource}`, {
    method: "POST",
    headers: { cookie, origin: server.url },
    body: form,
  });
}

/** A large, valid trial: many site-years of an RCBD with 4 treatments × 4 blocks. */
function bigTrial(siteYears: number, tag: string) {
  const sites = "site,location,soil_texture\nCR-01,Wren County,silt loam\n";
  const sy = ["site_year,site,crop,year,design,blocks,tillage,planting_date,row_spacing_in"];
  const plots = ["site_year,plot,block,treatment,yield_kg_ha,harvest_moisture_pct"];
  for (let i = 0; i < siteYears; i++) {
    const code = `CR-${tag}-${i}`;
    sy.push(`${code},CR-01,soybean,2024,RCBD,4,no-till,2024-05-10,30`);
    for (let b = 1; b <= 4; b++)
      ["CHK", "IF", "BAND", "BC"].forEach((t, k) =>
        plots.push(`${code},${b}0${k + 1},${b},${t},${3500 + k * 90 + ((i * 7 + b * 13 + k * 31) % 97)},13.${(i + b + k) % 10}`),
      );
  }
  const treatments =
    "treatment,name,is_check,application,product,grade,product_rate,rate_unit,placement,timing\n" +
    "CHK,Untreated check,true,1,,,,,,\nIF,In-furrow 10-34-0,false,1,APP,10-34-0,5,gal/ac,in-furrow,at-planting\n" +
    "BAND,2x2 band MAP,false,1,MAP,11-52-0,100,lb/ac,2x2-band,at-planting\nBC,Broadcast MAP,false,1,MAP,11-52-0,100,lb/ac,broadcast,pre-plant\n";
  return { sites, siteYears: sy.join("\n") + "\n", plots: plots.join("\n") + "\n", treatments, plotRows: plots.length - 1 };
}

const results: string[] = [];
function check(ok: boolean, what: string) {
  results.push(`| ${what} | ${ok ? "ok" : "FAILED"} |`);
  if (!ok) process.exitCode = 1;
  console.log(`${ok ? "ok" : "FAILED"}: ${what}`);
}

async function main() {
  let server = await startServerProcess({ port, dataDir, keepData: true, env: { PLOTBANK_ANON_RATE_PER_MIN: "100000" } });
  await server.stop();
  const before = await publishedFingerprints();
  console.log(`demo loaded: ${Object.keys(before).length} published versions`);

  for (let round = 1; round <= rounds; round++) {
    // --- 1. kill during a large import ---
    server = await startServerProcess({ port, dataDir, keepData: true });
    let cookie = await signIn(server, "curator@plotbank.test");
    const slug = `crash-test-${round}`;
    await call(server, cookie, "POST", "/api/v1/datasets", {
      slug,
      title: `Crash test ${round}`,
      crops: ["soybean"],
      region: "Tallgrass Basin",
      description: "Crash-safety check.",
    });
    const version = await call(server, cookie, "POST", `/api/v1/datasets/${slug}/versions`, {});
    const versionId = String(version.id);
    const trial = bigTrial(2500, String(round));
    for (const [resource, csv] of [
      ["sites", trial.sites],
      ["site_years", trial.siteYears],
      ["treatments", trial.treatments],
    ] as const) {
      const res = await uploadCsv(server, cookie, versionId, resource, csv);
      if (res.status !== 201) throw new Error(`${resource}: ${res.status} ${(await res.text()).slice(0, 500)}`);
    }
    const delay = 500 + round * 900;
    const pending = uploadCsv(server, cookie, versionId, "plots", trial.plots).catch(() => null);
    await new Promise((r) => setTimeout(r, delay));
    server.child.kill("SIGKILL");
    await pending;
    await server.stop();
    const plotCount = await withDb(async (ctx) =>
      Number((await rows(ctx, sql`select count(*)::int as n from plots where version_id = ${versionId}`))[0]!.n),
    );
    check(
      plotCount === 0 || plotCount === trial.plotRows,
      `round ${round}: import killed after ${delay} ms left the draft whole or absent (${plotCount} of ${trial.plotRows} plot rows)`,
    );
    check(
      JSON.stringify(await publishedFingerprints()) === JSON.stringify(before),
      `round ${round}: published versions unchanged after the import crash`,
    );

    // --- 2. kill during a publish ---
    server = await startServerProcess({ port, dataDir, keepData: true });
    check(true, `round ${round}: server restarted cleanly after the import crash`);
    cookie = await signIn(server, "curator@plotbank.test");
    if (plotCount === 0) {
      const res = await uploadCsv(server, cookie, versionId, "plots", trial.plots);
      if (res.status !== 201) throw new Error(`plots: ${res.status} ${(await res.text()).slice(0, 300)}`);
    }
    await call(server, cookie, "POST", `/api/v1/curation/versions/${versionId}/submit`, { changelog: "First release." });
    const reviewer = await signIn(server, "reviewer@plotbank.test");
    const approving = fetch(`${server.url}/api/v1/curation/versions/${versionId}/approve`, {
      method: "POST",
      headers: { cookie: reviewer, "content-type": "application/json", origin: server.url },
      body: "{}",
    }).catch(() => null);
    const killAfter = [50, 600, 3000][(round - 1) % 3]!;
    await new Promise((r) => setTimeout(r, killAfter));
    server.child.kill("SIGKILL");
    await approving;
    await server.stop();
    const state = await withDb(
      async (ctx) => (await rows(ctx, sql`select state, checksum, published_at from versions where id = ${versionId}`))[0]!,
    );
    const whole =
      state.state === "in_review"
        ? state.checksum === null && state.published_at === null
        : state.state === "published" && !!state.checksum && !!state.published_at;
    check(whole, `round ${round}: publish killed after ${killAfter} ms left the version ${state.state}, whole`);
    const after = await publishedFingerprints();
    const unchanged = Object.entries(before).every(([id, fp]) => after[id] === fp);
    check(unchanged, `round ${round}: earlier published versions unchanged after the publish crash`);
    if (state.state === "published") before[versionId] = after[versionId]!;
    server = await startServerProcess({ port, dataDir, keepData: true });
    const health = await fetch(`${server.url}/api/v1/health`);
    check(health.ok, `round ${round}: server restarted cleanly after the publish crash`);
    await server.stop();
  }
  const table = ["| check | result |", "|---|---|", ...results].join("\n");
  console.log(table);
  mkdirSync(path.resolve(__dirname, "out"), { recursive: true });
  writeFileSync(path.resolve(__dirname, "out/crash.md"), table + "\n");
  rmSync(work, { recursive: true, force: true });
}

main().catch((e) => {
  console.error(e);
  rmSync(work, { recursive: true, force: true });
  process.exit(1);
});
