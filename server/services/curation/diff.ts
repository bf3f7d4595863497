import { sql } from "drizzle-orm";
import type { Db } from "@/db/client";
import type { VersionDiff } from "@/schemas/curation";
import type { VersionDiffRows } from "@/schemas/review";
import type { ResourceName, TableSchemaDescriptor } from "@/schemas/table-schema";
import { badRequest } from "@/server/errors";
import { versionById } from "./access";
import { columnOf, fieldsOf, firstAlias, resourceOrder, resourceQueries } from "./resource-csv";

const keyOf: Record<ResourceName, string> = {
  sites: "s.code",
  site_years: "sy.code",
  soil_tests: "sy.code || '/' || st.analyte",
  treatments: "t.code || '/' || (row_number() OVER (PARTITION BY t.id ORDER BY a.id))::text",
  plots: "sy.code || '/' || p.plot",
  summaries: "sy.code || '/' || t.code",
};
const perSiteYear: ResourceName[] = ["soil_tests", "plots", "summaries"];

const uuid = (s: string) => `'${s.replace(/[^0-9a-f-]/gi, "")}'`;
const rowsOf = <T>(r: unknown) => (r as { rows: T[] }).rows;

function sides(schema: TableSchemaDescriptor, resource: ResourceName, fields: string[], from: string, to: string) {
  const q = resourceQueries[resource];
  const json = `jsonb_build_object(${fields.map((f) => `'${f}', (${columnOf(schema, resource, f)})::text`).join(", ")})`;
  const side = (v: string) =>
    `SELECT ${keyOf[resource]} AS k, ${json} AS j FROM ${q.from} WHERE ${firstAlias[resource]}.version_id = ${uuid(v)}`;
  return `WITH a AS (${side(from)}), b AS (${side(to)})`;
}
const kind = "CASE WHEN a.k IS NULL THEN 'added' WHEN b.k IS NULL THEN 'removed' ELSE 'changed' END";

type Bump = "major" | "minor" | "patch";
export function bumpSemver(semver: string, bump: Bump): string {
  const [maj = 0, min = 0, pat = 0] = semver.split(".").map(Number);
  if (bump === "major") return `${maj + 1}.0.0`;
  if (bump === "minor") return `${maj}.${min + 1}.0`;
  return `${maj}.${min}.${pat + 1}`;
}

function schemaDiff(a: TableSchemaDescriptor, b: TableSchemaDescriptor) {
  const added: string[] = [],
    removed: string[] = [];
  const changed: { field: string; what: string[] }[] = [];
  for (const resource of resourceOrder) {
    const fa = new Map((a.resources[resource]?.fields ?? []).map((f) => [f.name, f]));
    const fb = new Map((b.resources[resource]?.fields ?? []).map((f) => [f.name, f]));
    for (const name of fb.keys()) if (!fa.has(name)) added.push(`${resource}.${name}`);
    for (const [name, x] of fa) {
      const y = fb.get(name);
      if (!y) {
        removed.push(`${resource}.${name}`);
        continue;
      }
      const what = (["type", "unit", "title", "description", "constraints", "categories"] as const).filter(
        (k) => JSON.stringify(x[k] ?? null) !== JSON.stringify(y[k] ?? null),
      );
      if (what.length) changed.push({ field: `${resource}.${name}`, what });
    }
  }
  return { added, removed, changed };
}

const plural = (n: number, one: string, many = `${one}s`) => `${n} ${n === 1 ? one : many}`;
const listed = (items: string[], max = 5) =>
  items.length > max ? `${items.slice(0, max).join(", ")} and ${items.length - max} more` : items.join(", ");

/**
 * The suggested bump in one sentence a reviewer can check against the rows: what was added, removed or changed, and
 * where ("minor: 4 site-years added (…), no published value changed").
 */
function explainBump(bump: Bump, reasons: string[], siteYears: VersionDiff["siteYears"], rows: VersionDiff["rows"]): string {
  if (bump === "major") return `major: ${reasons.join("; ")}`;
  const changed = resourceOrder.filter((r) => rows[r].changed > 0);
  const valueWords = changed.length
    ? `${plural(
        changed.reduce((a, r) => a + rows[r].changed, 0),
        "published row",
      )} changed (${changed
        .map((r) => `${r}: ${rows[r].fields.map((f) => f.field).join(", ")}`)
        .join("; ")})${siteYears.changed.length ? ` at ${listed(siteYears.changed.map((c) => c.siteYear))}` : ""}`
    : "no published value changed";
  if (bump === "minor") {
    const what = [
      siteYears.added.length ? `${plural(siteYears.added.length, "site-year")} added (${listed(siteYears.added)})` : null,
      ...reasons.filter((r) => r.startsWith("fields added")),
    ].filter((x): x is string => !!x);
    return `minor: ${what.join("; ")}, ${valueWords}`;
  }
  const added = resourceOrder.filter((r) => rows[r].added > 0);
  if (!changed.length && !added.length) return "patch: no changes; the rows and the data dictionary are the same";
  const addedWords = added.length ? `; rows added to ${added.join(", ")} within existing site-years` : "";
  return `patch: no site-year added or removed; ${valueWords}${addedWords}`;
}

/** What changed between two versions of one dataset, and the semantic-version bump that change calls for. */
export async function diffVersions(db: Db, fromId: string, toId: string): Promise<VersionDiff> {
  const [{ version: from }, { version: to }] = await Promise.all([versionById(db, fromId), versionById(db, toId)]);
  if (from.datasetId !== to.datasetId)
    throw badRequest("Both versions must belong to the same dataset.", [{ field: "query.to", message: "another dataset's version" }]);
  const rows = {} as VersionDiff["rows"];
  const touchedSiteYears = new Map<string, Set<string>>();
  let siteYearAttrChanges: { k: string; aj: Record<string, string | null>; bj: Record<string, string | null> }[] = [];
  const siteYears = { added: [] as string[], removed: [] as string[], changed: [] as { siteYear: string; fields: string[] }[] };

  for (const resource of resourceOrder) {
    const common = fieldsOf(from.tableSchema, resource).filter((f) => fieldsOf(to.tableSchema, resource).includes(f));
    const withs = sides(to.tableSchema, resource, common, from.id, to.id);
    const counts = rowsOf<{ kind: string; n: number | string }>(
      await db.execute(
        sql.raw(`${withs} SELECT ${kind} AS kind, count(*) AS n FROM a FULL JOIN b ON a.k = b.k WHERE a.j IS DISTINCT FROM b.j GROUP BY 1`),
      ),
    );
    const n = (k: string) => Number(counts.find((c) => c.kind === k)?.n ?? 0);
    const fieldCounts = rowsOf<{ field: string; n: number | string }>(
      await db.execute(
        sql.raw(
          `${withs} SELECT f.key AS field, count(*) AS n FROM a JOIN b ON a.k = b.k, jsonb_each_text(b.j) f WHERE a.j IS DISTINCT FROM b.j AND (a.j ->> f.key) IS DISTINCT FROM f.value GROUP BY 1`,
        ),
      ),
    );
    const limit = resource === "site_years" ? 100_000 : 20;
    const sample = rowsOf<{
      kind: "added" | "removed" | "changed";
      k: string;
      aj: Record<string, string | null> | null;
      bj: Record<string, string | null> | null;
    }>(
      await db.execute(
        sql.raw(
          `${withs} SELECT ${kind} AS kind, coalesce(a.k, b.k) AS k, a.j AS aj, b.j AS bj FROM a FULL JOIN b ON a.k = b.k WHERE a.j IS DISTINCT FROM b.j ORDER BY coalesce(a.k, b.k) COLLATE "C" LIMIT ${limit}`,
        ),
      ),
    );
    const parse = (j: unknown) =>
      typeof j === "string" ? (JSON.parse(j) as Record<string, string | null>) : (j as Record<string, string | null> | null);
    const changedFields = (aj: Record<string, string | null> | null, bj: Record<string, string | null> | null) =>
      aj && bj ? Object.keys(bj).filter((f) => aj[f] !== bj[f]) : Object.keys(aj ?? bj ?? {});
    rows[resource] = {
      added: n("added"),
      removed: n("removed"),
      changed: n("changed"),
      fields: common.flatMap((field) => {
        const c = fieldCounts.find((x) => x.field === field);
        return c ? [{ field, rows: Number(c.n) }] : [];
      }),
      sample: sample.slice(0, 20).map((s) => ({ key: s.k, change: s.kind, fields: changedFields(parse(s.aj), parse(s.bj)) })),
    };
    if (resource === "site_years") {
      siteYears.added = sample.filter((s) => s.kind === "added").map((s) => s.k);
      siteYears.removed = sample.filter((s) => s.kind === "removed").map((s) => s.k);
      siteYearAttrChanges = sample.filter((s) => s.kind === "changed").map((s) => ({ k: s.k, aj: parse(s.aj)!, bj: parse(s.bj)! }));
    }
    if (perSiteYear.includes(resource)) {
      const grouped = rowsOf<{ sy: string }>(
        await db.execute(
          sql.raw(
            `${withs} SELECT DISTINCT split_part(coalesce(a.k, b.k), '/', 1) AS sy FROM a FULL JOIN b ON a.k = b.k WHERE a.j IS DISTINCT FROM b.j`,
          ),
        ),
      );
      for (const g of grouped) {
        const set = touchedSiteYears.get(g.sy) ?? new Set<string>();
        set.add(resource);
        touchedSiteYears.set(g.sy, set);
      }
    }
  }
  const addedOrRemoved = new Set([...siteYears.added, ...siteYears.removed]);
  const changedMap = new Map<string, Set<string>>();
  for (const c of siteYearAttrChanges) changedMap.set(c.k, new Set(Object.keys(c.bj).filter((f) => c.aj[f] !== c.bj[f])));
  for (const [sy, set] of touchedSiteYears) {
    if (addedOrRemoved.has(sy)) continue;
    const s = changedMap.get(sy) ?? new Set<string>();
    for (const r of set) s.add(r);
    changedMap.set(sy, s);
  }
  siteYears.changed = [...changedMap.entries()]
    .sort(([a], [b]) => (a < b ? -1 : 1))
    .map(([siteYear, f]) => ({ siteYear, fields: [...f].sort() }));

  const schema = schemaDiff(from.tableSchema, to.tableSchema);
  const reasons: string[] = [];
  const removedRows = resourceOrder.filter((r) => rows[r].removed > 0);
  if (schema.removed.length) reasons.push(`fields removed from the data dictionary: ${schema.removed.join(", ")}`);
  const typeChanged = schema.changed.filter((c) => c.what.includes("type"));
  if (typeChanged.length) reasons.push(`field types changed: ${typeChanged.map((c) => c.field).join(", ")}`);
  if (siteYears.removed.length) reasons.push(`site-years removed: ${siteYears.removed.join(", ")}`);
  if (removedRows.length) reasons.push(`rows removed from ${removedRows.join(", ")}`);
  let bump: Bump = "patch";
  if (reasons.length) bump = "major";
  else {
    if (siteYears.added.length) reasons.push(`site-years added: ${siteYears.added.join(", ")}`);
    if (schema.added.length) reasons.push(`fields added to the data dictionary: ${schema.added.join(", ")}`);
    if (reasons.length) bump = "minor";
    else
      reasons.push(
        siteYears.changed.length || resourceOrder.some((r) => rows[r].changed || rows[r].added) ? "corrections only" : "no changes",
      );
  }
  return {
    explanation: explainBump(bump, reasons, siteYears, rows),
    from: { id: from.id, semver: from.semver, state: from.state },
    to: { id: to.id, semver: to.semver, state: to.state },
    siteYears,
    rows,
    schema,
    suggestedBump: bump,
    reasons,
    suggestedSemver: bumpSemver(from.semver, bump),
  };
}

/** The site-year a row key belongs to, for the resources whose rows live inside one. */
const siteYearOfKey = (resource: ResourceName, key: string) =>
  resource === "site_years" ? key : perSiteYear.includes(resource) ? (key.split("/")[0] ?? null) : null;

/**
 * One page of a resource's differing rows between two versions, with the old and new value of every cell: changed
 * rows (both sides), added rows (new values only) and removed ones (old values only), in key order.
 */
export async function diffRows(
  db: Db,
  fromId: string,
  toId: string,
  resource: ResourceName,
  { page, limit, change }: { page: number; limit: number; change?: "added" | "removed" | "changed" },
): Promise<VersionDiffRows> {
  const [{ version: from }, { version: to }] = await Promise.all([versionById(db, fromId), versionById(db, toId)]);
  if (from.datasetId !== to.datasetId)
    throw badRequest("Both versions must belong to the same dataset.", [{ field: "query.to", message: "another dataset's version" }]);
  const fields = fieldsOf(from.tableSchema, resource).filter((f) => fieldsOf(to.tableSchema, resource).includes(f));
  const withs = sides(to.tableSchema, resource, fields, from.id, to.id);
  const only = change ? ` AND ${kind} = '${change}'` : "";
  const body = `FROM a FULL JOIN b ON a.k = b.k WHERE a.j IS DISTINCT FROM b.j${only}`;
  const [counted] = rowsOf<{ n: number | string }>(await db.execute(sql.raw(`${withs} SELECT count(*) AS n ${body}`)));
  const found = rowsOf<{ kind: "added" | "removed" | "changed"; k: string; aj: unknown; bj: unknown }>(
    await db.execute(
      sql.raw(
        `${withs} SELECT ${kind} AS kind, coalesce(a.k, b.k) AS k, a.j AS aj, b.j AS bj ${body} ORDER BY coalesce(a.k, b.k) COLLATE "C" LIMIT ${limit} OFFSET ${(page - 1) * limit}`,
      ),
    ),
  );
  const parse = (j: unknown) => (typeof j === "string" ? JSON.parse(j) : j) as Record<string, string | null> | null;
  return {
    from: { id: from.id, semver: from.semver, state: from.state },
    to: { id: to.id, semver: to.semver, state: to.state },
    resource,
    fields,
    page,
    limit,
    total: Number(counted?.n ?? 0),
    rows: found.map((r) => {
      const a = parse(r.aj),
        b = parse(r.bj);
      return {
        key: r.k,
        siteYear: siteYearOfKey(resource, r.k),
        change: r.kind,
        cells: fields.map((field) => {
          const old = a ? (a[field] ?? null) : null;
          const value = b ? (b[field] ?? null) : null;
          return { field, old, new: value, changed: !!a && !!b && old !== value };
        }),
      };
    }),
  };
}
