/**
 * Unit conversions for yield and fertilizer data.
 *
 * Sources: NIST Handbook 44 (2023) Appendix C (1 lb = 0.45359237 kg exactly; 1 acre = 4046.8564224 m²);
 * Mulvaney & Devkota (2020) UF/IFAS EDIS AG442 (moisture adjustment); Virginia Tech SPES-201NP
 * (oxide-to-element factors); University of Wisconsin Extension (test weights and standard moistures);
 * University of Nebraska PASSEL and Alabama Extension ANR-174 (fluid fertilizer densities);
 * University of Minnesota Extension (ppm × 2 ≈ lb/ac in a 6-inch layer).
 */

const KILOGRAMS_PER_POUND = 0.45359237;
const HECTARES_PER_ACRE = 0.40468564224;

/** Crops with a standard test weight (lb/bu) and standard moisture (% wet basis). */
export type StandardCrop = "soybean" | "corn" | "wheat";

/**
 * Market standards: soybean 60 lb/bu at 13%, corn 56 lb/bu at 15.5%, wheat 60 lb/bu at 13.5%
 * (University of Wisconsin Extension).
 */
export const cropStandards: Record<StandardCrop, { poundsPerBushel: number; standardMoisturePercent: number }> = {
  soybean: { poundsPerBushel: 60, standardMoisturePercent: 13 },
  corn: { poundsPerBushel: 56, standardMoisturePercent: 15.5 },
  wheat: { poundsPerBushel: 60, standardMoisturePercent: 13.5 },
};

function assertFinite(value: number, name: string): void {
  if (!Number.isFinite(value)) throw new RangeError(`${name} must be a finite number, got ${value}`);
}

/**
 * Adjusts a harvested yield to a standard moisture: Y_std = Y·(100 − M)/(100 − M_std).
 * Reference: Mulvaney & Devkota (2020) UF/IFAS EDIS AG442.
 * @example adjustYieldToMoisture(1000, 18, 13) // 942.5287356321839 (1000 lb at 18% is 942.5 lb at 13%)
 */
export function adjustYieldToMoisture(yieldValue: number, harvestMoisturePercent: number, standardMoisturePercent: number): number {
  assertFinite(yieldValue, "yield");
  for (const [value, name] of [
    [harvestMoisturePercent, "harvest moisture"],
    [standardMoisturePercent, "standard moisture"],
  ] as const) {
    if (!(value >= 0 && value < 100)) throw new RangeError(`${name} must be in [0, 100) %, got ${value}`);
  }
  return (yieldValue * (100 - harvestMoisturePercent)) / (100 - standardMoisturePercent);
}

/**
 * kg/ha per bu/ac for a test weight: lb/bu × 0.45359237 / 0.40468564224 (NIST Handbook 44, App. C).
 * @example kilogramsPerHectarePerBushelPerAcre(60) // 67.25 (soybean); 56 → 62.77 (corn)
 */
export function kilogramsPerHectarePerBushelPerAcre(poundsPerBushel: number): number {
  if (!(poundsPerBushel > 0)) throw new RangeError(`pounds per bushel must be > 0, got ${poundsPerBushel}`);
  return (poundsPerBushel * KILOGRAMS_PER_POUND) / HECTARES_PER_ACRE;
}

/** bu/ac → kg/ha. @example bushelsPerAcreToKilogramsPerHectare(60, 60) // 4035.07 */
export function bushelsPerAcreToKilogramsPerHectare(bushelsPerAcre: number, poundsPerBushel: number): number {
  assertFinite(bushelsPerAcre, "bu/ac");
  return bushelsPerAcre * kilogramsPerHectarePerBushelPerAcre(poundsPerBushel);
}

/** kg/ha → bu/ac. @example kilogramsPerHectareToBushelsPerAcre(4035.07, 60) // ≈ 60 */
export function kilogramsPerHectareToBushelsPerAcre(kilogramsPerHectare: number, poundsPerBushel: number): number {
  assertFinite(kilogramsPerHectare, "kg/ha");
  return kilogramsPerHectare / kilogramsPerHectarePerBushelPerAcre(poundsPerBushel);
}

/** lb/ac → kg/ha (× 1.12085). @example poundsPerAcreToKilogramsPerHectare(100) // 112.085 */
export function poundsPerAcreToKilogramsPerHectare(poundsPerAcre: number): number {
  assertFinite(poundsPerAcre, "lb/ac");
  return (poundsPerAcre * KILOGRAMS_PER_POUND) / HECTARES_PER_ACRE;
}

/** kg/ha → lb/ac (× 0.892179). @example kilogramsPerHectareToPoundsPerAcre(112.085) // ≈ 100 */
export function kilogramsPerHectareToPoundsPerAcre(kilogramsPerHectare: number): number {
  assertFinite(kilogramsPerHectare, "kg/ha");
  return (kilogramsPerHectare * HECTARES_PER_ACRE) / KILOGRAMS_PER_POUND;
}

/** P₂O₅ → P (× 0.4365; Virginia Tech SPES-201NP). @example phosphatePentoxideToPhosphorus(100) // 43.65 */
export function phosphatePentoxideToPhosphorus(p2o5: number): number {
  assertFinite(p2o5, "P2O5");
  return p2o5 * 0.4365;
}

/** P → P₂O₅ (÷ 0.4365). @example phosphorusToPhosphatePentoxide(43.65) // 100 */
export function phosphorusToPhosphatePentoxide(phosphorus: number): number {
  assertFinite(phosphorus, "P");
  return phosphorus / 0.4365;
}

/** K₂O → K (× 0.8301; Virginia Tech SPES-201NP). @example potashToPotassium(100) // 83.01 */
export function potashToPotassium(k2o: number): number {
  assertFinite(k2o, "K2O");
  return k2o * 0.8301;
}

/** K → K₂O (÷ 0.8301). @example potassiumToPotash(83.01) // 100 */
export function potassiumToPotash(potassium: number): number {
  assertFinite(potassium, "K");
  return potassium / 0.8301;
}

/** Fertilizer grade: percent N, P₂O₅, K₂O and optionally S by weight (e.g. 10-34-0, 12-0-0-26S). */
export interface FertilizerGrade {
  nitrogenPercent: number;
  phosphatePercent: number;
  potashPercent: number;
  sulfurPercent?: number;
}

/**
 * Parses a grade string such as "10-34-0", "11-52-0" or "12-0-0-26S".
 * @example parseFertilizerGrade("12-0-0-26S") // { nitrogenPercent: 12, phosphatePercent: 0, potashPercent: 0, sulfurPercent: 26 }
 */
export function parseFertilizerGrade(grade: string): FertilizerGrade {
  const match = /^\s*(\d+(?:\.\d+)?)-(\d+(?:\.\d+)?)-(\d+(?:\.\d+)?)(?:-(\d+(?:\.\d+)?)S?)?\s*$/i.exec(grade);
  if (!match) throw new RangeError(`Fertilizer grade "${grade}" is not of the form N-P2O5-K2O or N-P2O5-K2O-S (e.g. 10-34-0)`);
  const parsed: FertilizerGrade = {
    nitrogenPercent: Number(match[1]),
    phosphatePercent: Number(match[2]),
    potashPercent: Number(match[3]),
  };
  if (match[4] !== undefined) parsed.sulfurPercent = Number(match[4]);
  const total = parsed.nitrogenPercent + parsed.phosphatePercent + parsed.potashPercent + (parsed.sulfurPercent ?? 0);
  if (total > 100) throw new RangeError(`Fertilizer grade "${grade}" adds up to more than 100%`);
  return parsed;
}

/**
 * Typical densities of fluid fertilizers, lb/gal: 10-34-0 ≈ 11.4, 12-0-0-26S (ATS) ≈ 11.0
 * (University of Nebraska PASSEL); UAN28 10.67, UAN32 11.06 (Alabama Extension ANR-174).
 */
export const fluidFertilizerDensityPoundsPerGallon = {
  "10-34-0": 11.4,
  "12-0-0-26S": 11.0,
  UAN28: 10.67,
  UAN32: 11.06,
} as const;

/**
 * Nutrient rates (lb/ac) from a product rate and grade: product lb/ac × grade %.
 * @example nutrientRates(100, parseFertilizerGrade("11-52-0")) // { nitrogen: 11, phosphate: 52, potash: 0, sulfur: 0 }
 */
export function nutrientRates(
  productPoundsPerAcre: number,
  grade: FertilizerGrade,
): { nitrogen: number; phosphate: number; potash: number; sulfur: number } {
  if (!(productPoundsPerAcre >= 0)) throw new RangeError(`product rate must be >= 0 lb/ac, got ${productPoundsPerAcre}`);
  return {
    nitrogen: (productPoundsPerAcre * grade.nitrogenPercent) / 100,
    phosphate: (productPoundsPerAcre * grade.phosphatePercent) / 100,
    potash: (productPoundsPerAcre * grade.potashPercent) / 100,
    sulfur: (productPoundsPerAcre * (grade.sulfurPercent ?? 0)) / 100,
  };
}

/**
 * Product weight (lb/ac) of a fluid applied in gal/ac: gal/ac × lb/gal.
 * @example fluidProductPoundsPerAcre(5, 11.4) // 57 (5 gal/ac of 10-34-0)
 */
export function fluidProductPoundsPerAcre(gallonsPerAcre: number, poundsPerGallon: number): number {
  if (!(gallonsPerAcre >= 0)) throw new RangeError(`fluid rate must be >= 0 gal/ac, got ${gallonsPerAcre}`);
  if (!(poundsPerGallon > 0)) throw new RangeError(`density must be > 0 lb/gal, got ${poundsPerGallon}`);
  return gallonsPerAcre * poundsPerGallon;
}

/**
 * Soil-test ppm → lb/ac in a 6-inch layer (≈ 2,000,000 lb of soil per acre): ppm × 2.
 * An approximation (University of Minnesota Extension); real bulk density varies.
 * @example partsPerMillionToPoundsPerAcreSixInch(15) // 30
 */
export function partsPerMillionToPoundsPerAcreSixInch(ppm: number): number {
  assertFinite(ppm, "ppm");
  return ppm * 2;
}

/**
 * Soil-test lb/ac in a 6-inch layer → ppm: ÷ 2, the reverse of `partsPerMillionToPoundsPerAcreSixInch`.
 * @example poundsPerAcreSixInchToPartsPerMillion(30) // 15
 */
export function poundsPerAcreSixInchToPartsPerMillion(poundsPerAcre: number): number {
  assertFinite(poundsPerAcre, "lb/ac");
  return poundsPerAcre / 2;
}
