import type { UploadUnits } from "@/schemas/curation";
import {
  adjustYieldToMoisture,
  bushelsPerAcreToKilogramsPerHectare,
  cropStandards,
  fluidFertilizerDensityPoundsPerGallon,
  kilogramsPerHectareToPoundsPerAcre,
  phosphorusToPhosphatePentoxide,
  potassiumToPotash,
  poundsPerAcreToKilogramsPerHectare,
  type StandardCrop,
} from "@/stats";

/** Conversions applied as a file comes in, so everything is stored in canonical units. */

function standardsOf(crop: string) {
  return cropStandards[crop as StandardCrop] ?? null;
}

/** Factor from the upload's yield unit to kg/ha for a crop (bu/ac needs the crop's bushel weight). */
export function yieldFactorToKgHa(unit: UploadUnits["yield"], crop: string): number {
  if (unit === "kg/ha") return 1;
  if (unit === "lb/ac") return poundsPerAcreToKilogramsPerHectare(1);
  const standards = standardsOf(crop);
  if (!standards) throw new RangeError(`no bushel weight is known for crop "${crop}"`);
  return bushelsPerAcreToKilogramsPerHectare(1, standards.poundsPerBushel);
}

/** A yield as reported at harvest moisture, moved to the crop's standard moisture (wet basis). */
export function toStandardMoisture(yieldKgHa: number, harvestMoisturePct: number, crop: string): number {
  const standards = standardsOf(crop);
  if (!standards) throw new RangeError(`no standard moisture is known for crop "${crop}"`);
  return adjustYieldToMoisture(yieldKgHa, harvestMoisturePct, standards.standardMoisturePercent);
}

const LITRES_PER_GALLON = 3.785411784;
const HECTARES_PER_ACRE = 0.40468564224;

/** Typical densities by grade, lb/gal (see stats/units.ts for their sources). */
export function typicalDensity(grade: string): number | null {
  const g = grade.replace(/S$/i, "S");
  if (g === "10-34-0") return fluidFertilizerDensityPoundsPerGallon["10-34-0"];
  if (g === "12-0-0-26S" || g === "12-0-0-26") return fluidFertilizerDensityPoundsPerGallon["12-0-0-26S"];
  if (g === "28-0-0") return fluidFertilizerDensityPoundsPerGallon.UAN28;
  if (g === "32-0-0") return fluidFertilizerDensityPoundsPerGallon.UAN32;
  return null;
}

/** Product rate in lb/ac from the rate as given; fluids need a density. */
export function productPoundsPerAcre(rate: number, unit: string, densityLbGal: number | null): number {
  switch (unit) {
    case "lb/ac":
      return rate;
    case "kg/ha":
      return kilogramsPerHectareToPoundsPerAcre(rate);
    case "gal/ac":
      return rate * densityLbGal!;
    case "L/ha":
      // L/ha → gal/ac: × ha/ac ÷ L/gal.
      return ((rate * HECTARES_PER_ACRE) / LITRES_PER_GALLON) * densityLbGal!;
    default:
      throw new RangeError(`unknown rate unit "${unit}"`);
  }
}

export const isFluidUnit = (unit: string) => unit === "gal/ac" || unit === "L/ha";

/** Grade percentages as oxides; an elemental grade (P, K) is converted to P2O5 and K2O. */
export function gradeAsOxides(
  grade: { nitrogenPercent: number; phosphatePercent: number; potashPercent: number; sulfurPercent?: number },
  basis: UploadUnits["gradeBasis"],
) {
  if (basis === "oxide") return grade;
  return {
    ...grade,
    phosphatePercent: phosphorusToPhosphatePentoxide(grade.phosphatePercent),
    potashPercent: potassiumToPotash(grade.potashPercent),
  };
}
