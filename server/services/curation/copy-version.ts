import { sql } from "drizzle-orm";
import type { Tx } from "@/server/services/ingest/write-rows";

/**
 * Copies every row of one version into another, server-side with INSERT … SELECT. Ids are new; references are
 * remapped through the codes (site, site-year, treatment), which are unique within a version.
 */
export async function copyVersionRows(tx: Tx, from: string, to: string): Promise<void> {
  const steps = [
    sql`INSERT INTO sites (version_id, code, location, soil_series, soil_texture)
        SELECT ${to}, code, location, soil_series, soil_texture FROM sites WHERE version_id = ${from}`,
    sql`INSERT INTO site_years (version_id, site_id, code, crop, year, design, blocks, tillage, previous_crop, planting_date, row_spacing_in, variety, maturity_group)
        SELECT ${to}, ns.id, sy.code, sy.crop, sy.year, sy.design, sy.blocks, sy.tillage, sy.previous_crop, sy.planting_date, sy.row_spacing_in, sy.variety, sy.maturity_group
        FROM site_years sy JOIN sites os ON os.id = sy.site_id JOIN sites ns ON ns.version_id = ${to} AND ns.code = os.code
        WHERE sy.version_id = ${from}`,
    sql`INSERT INTO soil_tests (version_id, site_year_id, analyte, value, unit, extractant, depth_in, class, interpretation, reported_class)
        SELECT ${to}, nsy.id, st.analyte, st.value, st.unit, st.extractant, st.depth_in, st.class, st.interpretation, st.reported_class
        FROM soil_tests st JOIN site_years osy ON osy.id = st.site_year_id JOIN site_years nsy ON nsy.version_id = ${to} AND nsy.code = osy.code
        WHERE st.version_id = ${from}`,
    sql`INSERT INTO treatments (version_id, code, name, is_check, n_lb_ac, p2o5_lb_ac, k2o_lb_ac, s_lb_ac, nutrients, placements, tested_nutrients_stated)
        SELECT ${to}, code, name, is_check, n_lb_ac, p2o5_lb_ac, k2o_lb_ac, s_lb_ac, nutrients, placements, tested_nutrients_stated FROM treatments WHERE version_id = ${from}`,
    sql`INSERT INTO applications (version_id, treatment_id, product, grade, product_rate, rate_unit, density_lb_gal, placement, timing, n_lb_ac, p2o5_lb_ac, k2o_lb_ac, s_lb_ac)
        SELECT ${to}, nt.id, a.product, a.grade, a.product_rate, a.rate_unit, a.density_lb_gal, a.placement, a.timing, a.n_lb_ac, a.p2o5_lb_ac, a.k2o_lb_ac, a.s_lb_ac
        FROM applications a JOIN treatments ot ON ot.id = a.treatment_id JOIN treatments nt ON nt.version_id = ${to} AND nt.code = ot.code
        WHERE a.version_id = ${from} ORDER BY a.id`,
    sql`INSERT INTO plots (version_id, site_year_id, treatment_id, plot, block, yield_kg_ha, harvest_moisture_pct, stand_count, vigour, test_weight)
        SELECT ${to}, nsy.id, nt.id, p.plot, p.block, p.yield_kg_ha, p.harvest_moisture_pct, p.stand_count, p.vigour, p.test_weight
        FROM plots p JOIN site_years osy ON osy.id = p.site_year_id JOIN site_years nsy ON nsy.version_id = ${to} AND nsy.code = osy.code
        JOIN treatments ot ON ot.id = p.treatment_id JOIN treatments nt ON nt.version_id = ${to} AND nt.code = ot.code
        WHERE p.version_id = ${from}`,
    sql`INSERT INTO summary_means (version_id, site_year_id, treatment_id, mean_kg_ha, replicates, mse, df_error)
        SELECT ${to}, nsy.id, nt.id, m.mean_kg_ha, m.replicates, m.mse, m.df_error
        FROM summary_means m JOIN site_years osy ON osy.id = m.site_year_id JOIN site_years nsy ON nsy.version_id = ${to} AND nsy.code = osy.code
        JOIN treatments ot ON ot.id = m.treatment_id JOIN treatments nt ON nt.version_id = ${to} AND nt.code = ot.code
        WHERE m.version_id = ${from}`,
    sql`INSERT INTO responses (version_id, site_year_id, treatment_id, check_treatment_id, site_code, site_year_code, treatment_code, crop, year, tillage,
          row_spacing_in, planting_date, nutrients, placements, n_lb_ac, p2o5_lb_ac, k2o_lb_ac, s_lb_ac, soil_p_class, soil_p_value, soil_k_class,
          soil_k_value, soil_s_class, soil_s_value, check_mean_kg_ha, treated_mean_kg_ha, md_kg_ha, se_kg_ha, df_error, lnrr, lnrr_var, p_value,
          lsd05_kg_ha, cv_pct, replicates, balanced, from_summary, tested_nutrients_stated, soil_p_reported_class, soil_p_scheme,
          soil_k_reported_class, soil_k_scheme, soil_s_reported_class, soil_s_scheme)
        SELECT ${to}, nsy.id, nt.id, nc.id, r.site_code, r.site_year_code, r.treatment_code, r.crop, r.year, r.tillage,
          r.row_spacing_in, r.planting_date, r.nutrients, r.placements, r.n_lb_ac, r.p2o5_lb_ac, r.k2o_lb_ac, r.s_lb_ac, r.soil_p_class, r.soil_p_value, r.soil_k_class,
          r.soil_k_value, r.soil_s_class, r.soil_s_value, r.check_mean_kg_ha, r.treated_mean_kg_ha, r.md_kg_ha, r.se_kg_ha, r.df_error, r.lnrr, r.lnrr_var, r.p_value,
          r.lsd05_kg_ha, r.cv_pct, r.replicates, r.balanced, r.from_summary, r.tested_nutrients_stated, r.soil_p_reported_class, r.soil_p_scheme,
          r.soil_k_reported_class, r.soil_k_scheme, r.soil_s_reported_class, r.soil_s_scheme
        FROM responses r JOIN site_years osy ON osy.id = r.site_year_id JOIN site_years nsy ON nsy.version_id = ${to} AND nsy.code = osy.code
        JOIN treatments ot ON ot.id = r.treatment_id JOIN treatments nt ON nt.version_id = ${to} AND nt.code = ot.code
        JOIN treatments oc ON oc.id = r.check_treatment_id JOIN treatments nc ON nc.version_id = ${to} AND nc.code = oc.code
        WHERE r.version_id = ${from}`,
  ];
  for (const step of steps) await tx.execute(step);
}
