/**
 * The measures a plot can record and a response can be computed for: each with the plots column it is read from, its
 * unit as stored, the direction that is better and whether it is a rating (a score on a scale rather than a
 * quantity). The database, the contract, the server's documents and the Evidence screen take them from here; a
 * curator adds further measures to a version's data dictionary (`measures` beside `resources`) with the same fields.
 * Plain constants only: the client bundle imports this file.
 */

export const builtInMeasures = ["yield", "stand", "vigour", "test-weight", "moisture"] as const;
export type BuiltInMeasure = (typeof builtInMeasures)[number];

export const betterDirections = ["higher", "lower"] as const;
type BetterDirection = (typeof betterDirections)[number];

export interface MeasureDefinition {
  name: string;
  /** Words on screens: what the Evidence screen's "What to compare" choice shows. */
  title: string;
  /** The plots field (data dictionary name) the values are read from. */
  field: string;
  /** The unit responses are computed and answered in (yield: kg/ha stored, answered in bu/ac or kg/ha). */
  unit: string;
  better: BetterDirection;
  rating: boolean;
  /** A rating's scale in words, e.g. "1 (poor) to 9 (excellent)". */
  scale?: string;
  description: string;
}

export const defaultMeasure: BuiltInMeasure = "yield";

export const builtInMeasureDefinitions: Record<BuiltInMeasure, MeasureDefinition> = {
  yield: {
    name: "yield",
    title: "Yield",
    field: "yield_kg_ha",
    unit: "kg/ha",
    better: "higher",
    rating: false,
    description: "Grain yield at the crop's standard moisture; answered in bu/ac (each crop's bushel weight) or kg/ha.",
  },
  stand: {
    name: "stand",
    title: "Stand",
    field: "stand_count",
    unit: "plants/ac",
    better: "higher",
    rating: false,
    description:
      "Plants established, per acre. A data dictionary may state counts per 10 ft of row; they are converted to plants/ac with the site-year's row spacing.",
  },
  vigour: {
    name: "vigour",
    title: "Early growth",
    field: "vigour",
    unit: "score",
    better: "higher",
    rating: true,
    scale: "1 (poor) to 9 (excellent)",
    description: "Early vigour: a visual score or an early biomass, on the scale its data dictionary states.",
  },
  "test-weight": {
    name: "test-weight",
    title: "Test weight",
    field: "test_weight",
    unit: "lb/bu",
    better: "higher",
    rating: false,
    description: "Grain test weight (bulk density), lb per bushel.",
  },
  moisture: {
    name: "moisture",
    title: "Moisture",
    field: "harvest_moisture_pct",
    unit: "%",
    better: "lower",
    rating: false,
    description: "Grain moisture at harvest, % wet basis, as reported (lower dries for less).",
  },
};

export function isBuiltInMeasure(name: string): name is BuiltInMeasure {
  return (builtInMeasures as readonly string[]).includes(name);
}

/** Stand counts per 10 ft of row → plants/ac: 43,560 ft² per acre ÷ (10 ft × row spacing in ft). */
export function plantsPerAcreFromPer10Ft(count: number, rowSpacingIn: number): number {
  return (count * 43_560) / (10 * (rowSpacingIn / 12));
}

/** The stand_count units a data dictionary may state. */
export const standUnits = ["plants/ac", "plants/10 ft row"] as const;
