import { and, eq, inArray } from "drizzle-orm";
import { applications, treatments } from "@/db/schema";
import { nutrientRates, parseFertilizerGrade } from "@/stats";
import { gradeAsOxides, isFluidUnit, productPoundsPerAcre, typicalDensity } from "../edge-units";
import type { Cell } from "../field-values";
import { num, str, type IngestContext, type ResourceIngest } from "../resource-ingest";
import { insertRows } from "../write-rows";
import { trippedRules } from "@/server/services/cautions";
import { parseTestedNutrients, type Nutrient } from "@/server/services/tested-nutrients";

interface Application {
  product: string;
  grade: string;
  productRate: number;
  rateUnit: string;
  densityLbGal: number | null;
  placement: string;
  timing: string;
  n: number;
  p2o5: number;
  k2o: number;
  s: number;
}

interface TreatmentRow {
  code: string;
  name: string;
  isCheck: boolean;
  firstRow: number;
  applications: Map<number, Application>;
  /** As the curator stated it (the cell's text and its parsed nutrients), or null to derive it from the rates. */
  tested: { cell: string; nutrients: Nutrient[]; row: number } | null;
}

const round = (x: number) => Math.round(x * 1000) / 1000;
const required = ["product", "grade", "product_rate", "rate_unit", "placement", "timing"] as const;

/** A treatment's totals over its applications, the nutrients it supplies and its placements, as stored. */
function totals(t: TreatmentRow) {
  const apps = [...t.applications.values()];
  const sum = (k: "n" | "p2o5" | "k2o" | "s") => round(apps.reduce((a, x) => a + x[k], 0));
  const n = sum("n"),
    p2o5 = sum("p2o5"),
    k2o = sum("k2o"),
    s = sum("s");
  const nutrients = [n > 0 && "N", p2o5 > 0 && "P", k2o > 0 && "K", s > 0 && "S"].filter((x): x is string => !!x);
  const placements = [...new Set(apps.map((a) => a.placement))].sort();
  return {
    name: t.name,
    isCheck: t.isCheck,
    nLbAc: n,
    p2o5LbAc: p2o5,
    k2oLbAc: k2o,
    sLbAc: s,
    nutrients,
    placements,
    testedNutrientsStated: t.tested?.nutrients ?? null,
  };
}

export function treatmentsIngest({ state, options, report, versionId }: IngestContext): ResourceIngest {
  const rows = new Map<string, TreatmentRow>();
  let count = 0;
  /**
   * The caution rules (cautions.ts), tested against each treatment as the draft grows it: every crop and row spacing
   * of its site-years. A treatment uploaded before any site-year is tested at 30-in rows with no crop.
   */
  const warnCautions = () => {
    const grown = new Map<string, { crop: string; rowSpacingIn: number | null }>();
    for (const sy of state.siteYears.values()) grown.set(`${sy.crop}/${sy.rowSpacingIn}`, { crop: sy.crop, rowSpacingIn: sy.rowSpacingIn });
    if (grown.size === 0) grown.set("", { crop: "", rowSpacingIn: null });
    for (const t of rows.values()) {
      if (t.isCheck || t.applications.size === 0) continue;
      const apps = [...t.applications.values()].map((a) => ({ placement: a.placement, nLbAc: a.n, k2oLbAc: a.k2o }));
      const said = new Set<string>();
      for (const { crop, rowSpacingIn } of grown.values()) {
        for (const { rule, detail } of trippedRules({ dataset: "", treatment: t.code, crop, rowSpacingIn, applications: apps })) {
          const message = `treatment "${t.code}" trips caution ${rule.code}${crop ? ` on ${crop}` : ""}: ${detail}. ${rule.text} (${rule.source})`;
          if (said.has(message)) continue;
          said.add(message);
          report.warn(t.firstRow, "treatment", t.code, message, { kind: `caution:${rule.code}`, place: t.code });
        }
      }
    }
  };
  return {
    resource: "treatments",
    row(v, row) {
      const code = str(v.treatment);
      const name = str(v.name);
      if (code === null || name === null || v.is_check === null || v.application === null) return;
      const isCheck = v.is_check === true;
      const appNo = num(v.application)!;
      const testedCell = str(v.tested_nutrients);
      let tested: TreatmentRow["tested"] = null;
      if (testedCell !== null) {
        const parsed = parseTestedNutrients(testedCell);
        if (!parsed.ok) return report.error(row, "tested_nutrients", testedCell, parsed.message);
        if (isCheck)
          return report.error(
            row,
            "tested_nutrients",
            testedCell,
            `treatment "${code}" is the untreated check, so it tests nothing; leave tested_nutrients blank`,
          );
        tested = { cell: testedCell, nutrients: parsed.value, row };
      }
      let t = rows.get(code);
      if (!t) {
        t = { code, name, isCheck, firstRow: row, applications: new Map(), tested };
        rows.set(code, t);
      } else {
        if (t.name !== name) report.error(row, "name", name, `treatment "${code}" is called "${t.name}" in data row ${t.firstRow}`);
        if (t.isCheck !== isCheck)
          report.error(row, "is_check", String(v.is_check), `treatment "${code}" has is_check ${t.isCheck} in data row ${t.firstRow}`);
        // The statement belongs to the treatment: a blank on a later application row repeats the first one.
        if (tested && t.tested && tested.nutrients.join(";") !== t.tested.nutrients.join(";")) {
          report.error(
            row,
            "tested_nutrients",
            testedCell,
            `treatment "${code}" states tested_nutrients "${t.tested.cell}" in data row ${t.tested.row}`,
          );
        } else if (tested && !t.tested) t.tested = tested;
      }
      if (t.applications.has(appNo) || (isCheck && t.firstRow !== row)) {
        return report.error(
          row,
          "application",
          String(appNo),
          `treatment "${code}" already has application ${appNo} (treatment + application is the primary key)`,
        );
      }
      count += 1;
      if (isCheck) {
        if (v.product !== null || (num(v.product_rate) ?? 0) > 0) {
          report.error(
            row,
            "product",
            str(v.product),
            `treatment "${code}" is the untreated check, so it has no product; give it one row with the product blank`,
          );
        }
        return;
      }
      const missing = required.filter((f) => v[f] === null);
      for (const f of missing) report.error(row, f, null, `${f} is required for an application of a treatment that is not the check`);
      if (missing.length) return;
      const grade = String(v.grade);
      const unit = String(v.rate_unit);
      let parsed;
      try {
        parsed = gradeAsOxides(parseFertilizerGrade(grade), options.units.gradeBasis);
      } catch (error) {
        return report.error(row, "grade", grade, (error as Error).message);
      }
      let density = num(v.density_lb_gal);
      if (isFluidUnit(unit) && density === null) {
        density = typicalDensity(grade);
        if (density === null)
          return report.error(
            row,
            "density_lb_gal",
            null,
            `a fluid rate (${unit}) of grade ${grade} needs density_lb_gal; no typical density is on file for it`,
          );
      }
      const productLbAc = productPoundsPerAcre(num(v.product_rate)!, unit, density);
      const rates = nutrientRates(productLbAc, parsed);
      const app: Application = {
        product: String(v.product),
        grade,
        productRate: num(v.product_rate)!,
        rateUnit: unit,
        densityLbGal: isFluidUnit(unit) ? density : null,
        placement: String(v.placement),
        timing: String(v.timing),
        n: round(rates.nitrogen),
        p2o5: round(rates.phosphate),
        k2o: round(rates.potash),
        s: round(rates.sulfur),
      };
      for (const [field, computed] of [
        ["n_lb_ac", app.n],
        ["p2o5_lb_ac", app.p2o5],
        ["k2o_lb_ac", app.k2o],
        ["s_lb_ac", app.s],
      ] as const) {
        const given = num(v[field]);
        if (given !== null && Math.abs(given - computed) > 0.5 + 0.02 * computed) {
          report.warn(
            row,
            field,
            String(given),
            `${field} ${given} differs from ${computed} computed from grade ${grade} at ${app.productRate} ${unit}; the computed value is stored`,
          );
        }
      }
      t.applications.set(appNo, app);
    },
    finish() {
      for (const t of rows.values()) {
        if (!t.isCheck && t.applications.size === 0)
          report.error(t.firstRow, "treatment", t.code, `treatment "${t.code}" is not the check but has no valid application`);
        if (t.tested && t.applications.size > 0) {
          const supplied = totals(t).nutrients;
          const absent = t.tested.nutrients.filter((n) => !supplied.includes(n));
          if (absent.length) {
            report.error(
              t.tested.row,
              "tested_nutrients",
              t.tested.cell,
              `treatment "${t.code}" states it tests ${absent.join(", ")}, but its products add no ${absent.join(" or ")}`,
            );
          }
        }
      }
      warnCautions();
      if (options.mode === "replace") {
        for (const [code, t] of state.treatments) {
          if (!rows.has(code) && t.used)
            report.error(
              null,
              "treatment",
              code,
              `treatment "${code}" is missing from the file but plots or summaries still use it; remove those first`,
            );
        }
      }
    },
    count: () => count,
    async write(database, tx) {
      const ids = new Map<string, number>();
      for (const t of rows.values()) {
        const values = totals(t);
        const existing = state.treatments.get(t.code);
        if (existing) {
          await tx.update(treatments).set(values).where(eq(treatments.id, existing.id));
          ids.set(t.code, existing.id);
        } else {
          const [inserted] = await tx
            .insert(treatments)
            .values({ versionId, code: t.code, ...values })
            .returning({ id: treatments.id });
          ids.set(t.code, inserted!.id);
        }
      }
      const touched = [...ids.values()];
      if (touched.length)
        await tx.delete(applications).where(and(eq(applications.versionId, versionId), inArray(applications.treatmentId, touched)));
      const appRows: Cell[][] = [];
      for (const t of rows.values()) {
        for (const a of [...t.applications.entries()].sort(([x], [y]) => x - y).map(([, a]) => a)) {
          appRows.push([
            versionId,
            ids.get(t.code)!,
            a.product,
            a.grade,
            a.productRate,
            a.rateUnit,
            a.densityLbGal,
            a.placement,
            a.timing,
            a.n,
            a.p2o5,
            a.k2o,
            a.s,
          ]);
        }
      }
      await insertRows(
        database,
        tx,
        applications,
        [
          "versionId",
          "treatmentId",
          "product",
          "grade",
          "productRate",
          "rateUnit",
          "densityLbGal",
          "placement",
          "timing",
          "nLbAc",
          "p2o5LbAc",
          "k2oLbAc",
          "sLbAc",
        ],
        appRows,
      );
      if (options.mode === "replace") {
        const gone = [...state.treatments.entries()].filter(([c]) => !rows.has(c)).map(([, t]) => t.id);
        if (gone.length) await tx.delete(treatments).where(inArray(treatments.id, gone));
      }
      return "all";
    },
  };
}
