import type { SoilTestScheme } from "@/schemas/soil-test-schemes";
import { classifyByThresholds, interpretSoilTest } from "@/server/services/soil-test-schemes";
import { mulberry32, type Random } from "./prng";
import { siteByCode, type DemoSite } from "./tallgrass-sites";

/**
 * Generates the demo trials as CSV text, exactly as a curator would upload them. Each site-year draws from its own
 * seed (dataset + site-year code), so adding a season never changes the seasons already published.
 */

interface DemoTreatment {
  code: string;
  name: string;
  /** CSV rows after treatment,name,is_check,tested_nutrients: application,product,grade,product_rate,rate_unit,placement,timing. */
  applications: string[];
  /** The nutrients the curator states the treatment tests ("P", "N;S"); blank leaves them to the products. */
  tested?: string;
  /** N + K2O placed with the seed, lb/ac (in-furrow applications only): the demo's stand and early-growth injury grow with it. */
  seedPlacedNK2o?: number;
  /** Expected yield response (kg/ha) on this site-year. */
  response(ctx: { site: DemoSite; pClass: string; kClass: string; early: boolean; rng: Random }): number;
}

export interface DemoSiteYear {
  code: string;
  site: DemoSite;
  year: number;
  crop: "soybean" | "corn";
  early: boolean;
  plantingDate: string;
  blocks: number;
}

export interface DemoTrial {
  key: string;
  crop: "soybean" | "corn";
  treatments: DemoTreatment[];
  siteYears(year: number): DemoSiteYear[];
  /** Plots removed (lost at harvest) to make some site-years unbalanced: "site-year/plot". */
  lostPlots?: Set<string>;
  /** A keying error in an early release, corrected in a later one: site-year/plot → multiplier. */
  typo?: { plot: string; factor: number };
  /** A soil-test scheme the trial's lab reports sulfate-S under, registered in the dataset's data dictionary. */
  sulfurScheme?: SoilTestScheme;
}

/** Invented: the demo network's lab reports sulfate-S in three classes; its "medium" is our optimum. */
const tallgrassLabSulfur: SoilTestScheme = {
  name: "tallgrass-lab-sulfate-s",
  title: "Tallgrass Basin network lab, sulfate-S in three classes (invented)",
  analyte: "S",
  extractant: "calcium-phosphate",
  unit: "ppm",
  classes: [
    { label: "low", scale: "low" },
    { label: "medium", scale: "optimum" },
    { label: "high", scale: "high" },
  ],
  thresholds: [6, 11],
  source: "Invented for the fictional demo network's lab reports; not a recommendation for any real field.",
  sourceStatus: "invented for the demo",
};

const CV = 0.07;
const pad = (n: number) => String(n).padStart(2, "0");

function classOf(analyte: "P" | "K", extractant: string, ppm: number): string {
  return interpretSoilTest("tallgrass-illustrative", analyte, extractant, ppm) ?? "optimum";
}

/** A site's soil test drifts a little from year to year. */
function soil(site: DemoSite, code: string) {
  const rng = mulberry32(`soil:${code}`);
  const p = Math.max(2, Math.round(site.p * rng.between(0.85, 1.15)));
  const k = Math.round(site.k * rng.between(0.9, 1.1));
  const s = Math.max(1, Math.round(site.s * rng.between(0.8, 1.2)));
  const om = Math.round(site.om * rng.between(0.92, 1.08) * 10) / 10;
  return { p, k, s, om, pClass: classOf("P", "Bray-P1", p), kClass: classOf("K", "ammonium-acetate", k) };
}

export function sitesCsv(codes: string[]): string {
  const lines = ["site,location,soil_series,soil_texture"];
  for (const code of [...new Set(codes)].sort()) {
    const s = siteByCode.get(code)!;
    lines.push(`${s.code},${s.county},${s.soilSeries},${s.texture}`);
  }
  return lines.join("\n") + "\n";
}

export function siteYearsCsv(sys: DemoSiteYear[]): string {
  const lines = ["site_year,site,crop,year,design,blocks,tillage,previous_crop,planting_date,row_spacing_in,variety,maturity_group"];
  for (const sy of sys) {
    const soy = sy.crop === "soybean";
    lines.push(
      [
        sy.code,
        sy.site.code,
        sy.crop,
        sy.year,
        "RCBD",
        sy.blocks,
        sy.site.tillage,
        soy ? "corn" : "soybean",
        sy.plantingDate,
        30,
        soy ? "TG-2.4 (invented)" : "TGH-108 (invented)",
        soy ? "2.4" : "108 d",
      ].join(","),
    );
  }
  return lines.join("\n") + "\n";
}

export function soilTestsCsv(sys: DemoSiteYear[], sulfurScheme?: SoilTestScheme): string {
  const lines = ["site_year,analyte,value,unit,extractant,depth_in,class,interpretation"];
  for (const sy of sys) {
    const t = soil(sy.site, sy.code.replace(/-[EN]$/, ""));
    lines.push(`${sy.code},P,${t.p},ppm,Bray-P1,6,${t.pClass},tallgrass-illustrative`);
    lines.push(`${sy.code},K,${t.k},ppm,ammonium-acetate,6,${t.kClass},tallgrass-illustrative`);
    // Reported under the lab's own labels where the trial's dictionary registers its scheme.
    if (sulfurScheme)
      lines.push(
        `${sy.code},S,${t.s},ppm,${sulfurScheme.extractant},6,${classifyByThresholds(sulfurScheme, t.s)!.label},${sulfurScheme.name}`,
      );
    else lines.push(`${sy.code},S,${t.s},ppm,,6,,`);
    lines.push(`${sy.code},OM,${t.om},%,loss-on-ignition,6,,`);
  }
  return lines.join("\n") + "\n";
}

export function treatmentsCsv(trial: DemoTrial): string {
  const lines = ["treatment,name,is_check,tested_nutrients,application,product,grade,product_rate,rate_unit,placement,timing"];
  for (const t of trial.treatments) {
    const name = t.name.includes(",") ? `"${t.name}"` : t.name;
    if (t.applications.length === 0) lines.push(`${t.code},${name},true,,1,,,,,,`);
    t.applications.forEach((a, i) => lines.push(`${t.code},${name},false,${t.tested ?? ""},${i + 1},${a}`));
  }
  return lines.join("\n") + "\n";
}

/**
 * Invented seed-placement injury: the share of the stand lost per lb/ac of N + K2O with the seed, soybean (more
 * salt-sensitive than corn), half again on sandy soils; and the early-growth points lost per lb/ac. Plausible in size
 * for the demo ("some stand loss at pop-up rates"), not taken from any trial.
 */
const standLossPerLb = { soybean: 0.016, corn: 0.006 } as const;
const vigourLossPerLb = 0.22;
const injuryOf = (seedNK2o: number, crop: "soybean" | "corn", sandy: boolean) =>
  seedNK2o * (sandy ? 1.5 : 1) * (crop === "soybean" ? 1 : 0.4);

/**
 * Plots of an RCBD: block effects, plot noise at a CV of 7 %, harvest moisture around the standard, stand counts and
 * early-growth scores (1–9) that carry the seed-placement injury above. Vigour draws from its own seed, so the yields
 * (and the demo's answer) are those the earlier releases had.
 */
export function plotsCsv(trial: DemoTrial, sys: DemoSiteYear[], options: { withTypo?: boolean } = {}): string {
  const lines = ["site_year,plot,block,treatment,yield_kg_ha,harvest_moisture_pct,stand_count,vigour"];
  for (const sy of sys) {
    const rng = mulberry32(`${trial.key}:${sy.code}`);
    const vigourRng = mulberry32(`${trial.key}:${sy.code}:vigour`);
    const sandy = sy.site.texture.includes("sand");
    const siteVigour = vigourRng.between(5.5, 7.5);
    const t = soil(sy.site, sy.code.replace(/-[EN]$/, ""));
    const base = (sy.crop === "soybean" ? sy.site.soyYield : sy.site.cornYield) * rng.between(0.9, 1.08) * (sy.early ? 1.04 : 1);
    const effects = trial.treatments.map((tr) => tr.response({ site: sy.site, pClass: t.pClass, kClass: t.kClass, early: sy.early, rng }));
    for (let b = 1; b <= sy.blocks; b++) {
      const blockEffect = rng.normal(0, 0.03 * base);
      const order = trial.treatments.map((_, i) => i).sort(() => rng.next() - 0.5);
      order.forEach((ti, position) => {
        const tr = trial.treatments[ti]!;
        const plot = `${b}${pad(position + 1)}`;
        const key = `${sy.code}/${plot}`;
        let y = base + effects[ti]! + blockEffect + rng.normal(0, CV * base);
        const moisture = Math.round((sy.crop === "soybean" ? rng.between(11.5, 15) : rng.between(15, 21)) * 10) / 10;
        const injury = injuryOf(tr.seedPlacedNK2o ?? 0, sy.crop, sandy);
        const stand = Math.round(
          (sy.crop === "soybean" ? 120_000 : 33_000) * rng.between(0.9, 1.05) * Math.max(0, 1 - standLossPerLb[sy.crop] * injury),
        );
        const vigour = Math.min(9, Math.max(1, Math.round(siteVigour + vigourRng.normal(0, 0.7) - vigourLossPerLb * injury)));
        if (trial.lostPlots?.has(key)) return;
        if (options.withTypo && trial.typo?.plot === key) y *= trial.typo.factor;
        lines.push(`${sy.code},${plot},${b},${tr.code},${Math.round(y)},${moisture},${stand},${vigour}`);
      });
    }
  }
  return lines.join("\n") + "\n";
}

const pResponse: Record<string, number> = { very_low: 420, low: 260, optimum: 70, high: 10, very_high: 0 };
const kResponse: Record<string, number> = { very_low: 700, low: 420, optimum: 120, high: 15, very_high: 0 };

/** Soybean starter placement × soil-test P, 2020–2025. */
export const starterTrial: DemoTrial = {
  key: "soy-starter-p",
  crop: "soybean",
  treatments: [
    { code: "CHK", name: "Untreated check", applications: [], response: () => 0 },
    {
      code: "IF-APP",
      tested: "P",
      name: "In-furrow 10-34-0, 3 gal/ac",
      applications: ["APP 10-34-0,10-34-0,3,gal/ac,in-furrow,at-planting"],
      // 3 gal × 11.4 lb/gal × 10 % N.
      seedPlacedNK2o: 3.42,
      response: ({ pClass }) => 0.45 * pResponse[pClass]! - 25,
    },
    {
      code: "IF-MAP",
      tested: "P",
      name: "In-furrow MAP, 40 lb/ac",
      applications: ["MAP,11-52-0,40,lb/ac,in-furrow,at-planting"],
      // 40 lb × 11 % N.
      seedPlacedNK2o: 4.4,
      response: ({ pClass }) => 0.55 * pResponse[pClass]! - 40,
    },
    {
      code: "BAND-MAP",
      tested: "P",
      name: "2x2 band MAP, 100 lb/ac",
      applications: ["MAP,11-52-0,100,lb/ac,2x2-band,at-planting"],
      response: ({ pClass }) => pResponse[pClass]!,
    },
    {
      code: "BC-MAP",
      tested: "P",
      name: "Broadcast MAP, 100 lb/ac",
      applications: ["MAP,11-52-0,100,lb/ac,broadcast,pre-plant"],
      response: ({ pClass }) => 0.8 * pResponse[pClass]!,
    },
  ],
  siteYears(year) {
    const rotation = [
      ["TB-01", "TB-03", "TB-06", "TB-07", "TB-09", "TB-12"],
      ["TB-02", "TB-03", "TB-04", "TB-06", "TB-10", "TB-12"],
    ][year % 2]!;
    return rotation.map((code) => {
      const site = siteByCode.get(code)!;
      return {
        code: `${code}-${year}`,
        site,
        year,
        crop: "soybean" as const,
        early: false,
        plantingDate: `${year}-05-${pad(site.plantingDay + 4)}`,
        blocks: 4 + (year % 3),
      };
    });
  },
  lostPlots: new Set(["TB-06-2021/302", "TB-06-2021/405"]),
  typo: { plot: "TB-03-2021/203", factor: 2.3 },
};

/** Soybean N and S at planting, early and normal planting dates, 2021–2024. */
export const nitrogenSulfurTrial: DemoTrial = {
  key: "soy-n-s",
  crop: "soybean",
  sulfurScheme: tallgrassLabSulfur,
  treatments: [
    { code: "CHK", name: "Untreated check", applications: [], response: () => 0 },
    {
      code: "UREA",
      name: "Urea, 30 lb N/ac broadcast",
      applications: ["Urea,46-0-0,65,lb/ac,broadcast,at-planting"],
      response: ({ early }) => (early ? 55 : 15),
    },
    {
      code: "AMS",
      tested: "N;S",
      name: "Ammonium sulfate, 100 lb/ac broadcast",
      applications: ["AMS,21-0-0-24S,100,lb/ac,broadcast,at-planting"],
      response: ({ site, early }) => (site.s <= 5 ? 190 : 60) * (early ? 1.3 : 1),
    },
    {
      code: "ATS",
      tested: "N;S",
      name: "ATS 12-0-0-26S, 5 gal/ac in a 2x2 band",
      applications: ["ATS,12-0-0-26S,5,gal/ac,2x2-band,at-planting"],
      response: ({ site, early }) => (site.s <= 5 ? 150 : 45) * (early ? 1.25 : 1),
    },
  ],
  siteYears(year) {
    const codes = ["TB-04", "TB-05", "TB-08", "TB-11"];
    return codes.flatMap((code) => {
      const site = siteByCode.get(code)!;
      return [
        {
          code: `${code}-${year}-E`,
          site,
          year,
          crop: "soybean" as const,
          early: true,
          plantingDate: `${year}-04-${pad(18 + (site.plantingDay % 8))}`,
          blocks: 4,
        },
        {
          code: `${code}-${year}-N`,
          site,
          year,
          crop: "soybean" as const,
          early: false,
          plantingDate: `${year}-05-${pad(site.plantingDay + 10)}`,
          blocks: 4,
        },
      ];
    });
  },
};

/** Corn 2x2 N + K starter at three rates, 2021–2025. N + K2O stays at or under 90 lb/ac in the band (common practice, no source). */
export const cornStarterTrial: DemoTrial = {
  key: "corn-2x2-nk",
  crop: "corn",
  treatments: [
    { code: "CHK", name: "Untreated check", applications: [], response: () => 0 },
    {
      code: "NK-15",
      tested: "N;K",
      name: "2x2 band 15 N + 15 K2O",
      applications: ["UAN 28,28-0-0,5,gal/ac,2x2-band,at-planting", "Potash,0-0-60,25,lb/ac,2x2-band,at-planting"],
      response: ({ kClass }) => 0.5 * kResponse[kClass]! + 60,
    },
    {
      code: "NK-30",
      tested: "N;K",
      name: "2x2 band 30 N + 30 K2O",
      applications: ["UAN 28,28-0-0,10,gal/ac,2x2-band,at-planting", "Potash,0-0-60,50,lb/ac,2x2-band,at-planting"],
      response: ({ kClass }) => 0.85 * kResponse[kClass]! + 110,
    },
    {
      code: "NK-45",
      tested: "N;K",
      name: "2x2 band 45 N + 45 K2O",
      applications: ["UAN 28,28-0-0,15,gal/ac,2x2-band,at-planting", "Potash,0-0-60,75,lb/ac,2x2-band,at-planting"],
      response: ({ kClass, site }) => kResponse[kClass]! + 130 - (site.texture.includes("sand") ? 180 : 0),
    },
  ],
  siteYears(year) {
    const codes = ["TB-01", "TB-02", "TB-07", "TB-10", "TB-11"];
    return codes.map((code) => {
      const site = siteByCode.get(code)!;
      return {
        code: `${code}-${year}`,
        site,
        year,
        crop: "corn" as const,
        early: false,
        plantingDate: `${year}-04-${pad(22 + (site.plantingDay % 8))}`,
        blocks: 5,
      };
    });
  },
  lostPlots: new Set(["TB-10-2022/403"]),
};
