import { sql, type SQL } from "drizzle-orm";
import type { Db } from "@/db/client";
import { applications, responses } from "@/db/schema";
import type { CautionTreatment } from "@/server/services/cautions";
import type { ResolvedVersion } from "@/server/services/trial-filter";

/**
 * The treatments a filtered analysis includes, as grown (crop and row spacing) with their applications, for the
 * caution rules. One read: the distinct treatment × crop × row spacing of the filtered responses, joined to their
 * applications.
 */
export async function includedTreatments(db: Db, where: SQL | undefined, versions: ResolvedVersion[]): Promise<CautionTreatment[]> {
  const result = await db.execute(sql`
    SELECT r.version_id, r.treatment_code, r.crop, r.row_spacing_in, a.placement, a.n_lb_ac, a.k2o_lb_ac
    FROM (SELECT DISTINCT ${responses.versionId} AS version_id, ${responses.treatmentId} AS treatment_id, ${responses.treatmentCode} AS treatment_code,
            ${responses.crop} AS crop, ${responses.rowSpacingIn} AS row_spacing_in
          FROM ${responses} WHERE ${where}) r
    JOIN ${applications} a ON a.treatment_id = r.treatment_id
    ORDER BY r.version_id, r.treatment_code, r.crop, r.row_spacing_in, a.id`);
  const rows = (
    result as unknown as {
      rows: {
        version_id: string;
        treatment_code: string;
        crop: string;
        row_spacing_in: number | string | null;
        placement: string;
        n_lb_ac: number | string;
        k2o_lb_ac: number | string;
      }[];
    }
  ).rows;
  const slugOf = new Map(versions.map((v) => [v.versionId, v.datasetSlug]));
  const byKey = new Map<string, CautionTreatment>();
  for (const r of rows) {
    const rowSpacingIn = r.row_spacing_in === null ? null : Number(r.row_spacing_in);
    const key = `${r.version_id}\u0000${r.treatment_code}\u0000${r.crop}\u0000${rowSpacingIn}`;
    let t = byKey.get(key);
    if (!t)
      byKey.set(
        key,
        (t = { dataset: slugOf.get(r.version_id) ?? "", treatment: r.treatment_code, crop: r.crop, rowSpacingIn, applications: [] }),
      );
    t.applications.push({ placement: r.placement, nLbAc: Number(r.n_lb_ac), k2oLbAc: Number(r.k2o_lb_ac) });
  }
  return [...byKey.values()];
}
