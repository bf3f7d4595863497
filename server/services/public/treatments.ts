import { and, gt, inArray } from "drizzle-orm";
import { applications, treatments } from "@/db/schema";
import type { TrialFilters } from "@/schemas/filters";
import { treatmentRow, type TreatmentRow } from "@/schemas/public";
import { testedNutrients } from "@/server/services/tested-nutrients";
import { treatmentConditions } from "@/server/services/trial-filter";
import { columnsFromFields, provenanceLookup, versionIdsOf, type RowResource } from "./row-resource";

type Application = TreatmentRow["applications"][number];

const applicationText = (a: Application) => `${a.product} ${a.grade} ${a.productRate} ${a.rateUnit} ${a.placement} ${a.timing}`;

export const treatmentResource: RowResource<TreatmentRow, Partial<TrialFilters>> = {
  name: "treatments",
  row: treatmentRow,
  async readBatch(db, scope, afterId, limit) {
    const from = provenanceLookup(scope);
    const rows = await db
      .select()
      .from(treatments)
      .where(and(treatmentConditions(scope.filters, versionIdsOf(scope)), gt(treatments.id, afterId)))
      .orderBy(treatments.id)
      .limit(limit);
    const ids = rows.map((r) => r.id);
    const apps = ids.length
      ? await db.select().from(applications).where(inArray(applications.treatmentId, ids)).orderBy(applications.id)
      : [];
    const byTreatment = new Map<number, Application[]>();
    for (const a of apps) {
      const list = byTreatment.get(a.treatmentId) ?? [];
      list.push({
        product: a.product,
        grade: a.grade,
        productRate: a.productRate,
        rateUnit: a.rateUnit,
        placement: a.placement,
        timing: a.timing,
        nLbAc: a.nLbAc,
        p2o5LbAc: a.p2o5LbAc,
        k2oLbAc: a.k2oLbAc,
        sLbAc: a.sLbAc,
      });
      byTreatment.set(a.treatmentId, list);
    }
    return rows.map((t) => ({
      id: t.id,
      ...from(t.versionId),
      code: t.code,
      name: t.name,
      isCheck: t.isCheck,
      nLbAc: t.nLbAc,
      p2o5LbAc: t.p2o5LbAc,
      k2oLbAc: t.k2oLbAc,
      sLbAc: t.sLbAc,
      nutrients: t.nutrients,
      testedNutrients: t.isCheck ? [] : testedNutrients(t),
      testedNutrientsStated: t.testedNutrientsStated !== null,
      placements: t.placements,
      applications: byTreatment.get(t.id) ?? [],
    }));
  },
  csvColumns: columnsFromFields<TreatmentRow>(Object.keys(treatmentRow.shape) as (keyof TreatmentRow)[], {
    applications: [{ name: "applications", value: (t) => t.applications.map(applicationText).join(" | ") }],
  }),
};
