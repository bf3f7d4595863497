/**
 * The invented Tallgrass Basin Agronomy Network: twelve sites in fictional counties of an unnamed temperate region.
 * Every name, soil and number here is made up for the demo.
 */
export interface DemoSite {
  code: string;
  county: string;
  soilSeries: string;
  texture: string;
  tillage: "no-till" | "strip-till" | "reduced" | "conventional";
  /** Typical Bray-P1 P, ammonium-acetate K (ppm), sulfate-S (ppm) and organic matter (%) of the site. */
  p: number;
  k: number;
  s: number;
  om: number;
  /** Typical yields, kg/ha at standard moisture. */
  soyYield: number;
  cornYield: number;
  /** Day of May of a normal planting. */
  plantingDay: number;
}

const demoSites: DemoSite[] = [
  {
    code: "TB-01",
    county: "Wren County",
    soilSeries: "Harlan",
    texture: "silt loam",
    tillage: "no-till",
    p: 6,
    k: 105,
    s: 6,
    om: 2.6,
    soyYield: 3700,
    cornYield: 11200,
    plantingDay: 8,
  },
  {
    code: "TB-02",
    county: "Wren County",
    soilSeries: "Marrow",
    texture: "clay loam",
    tillage: "conventional",
    p: 24,
    k: 190,
    s: 9,
    om: 4.1,
    soyYield: 4200,
    cornYield: 12400,
    plantingDay: 12,
  },
  {
    code: "TB-03",
    county: "Osage Bend County",
    soilSeries: "Quillen",
    texture: "loam",
    tillage: "strip-till",
    p: 9,
    k: 125,
    s: 7,
    om: 3.0,
    soyYield: 3900,
    cornYield: 11800,
    plantingDay: 10,
  },
  {
    code: "TB-04",
    county: "Osage Bend County",
    soilSeries: "Tarrow",
    texture: "sandy loam",
    tillage: "no-till",
    p: 13,
    k: 88,
    s: 4,
    om: 1.6,
    soyYield: 3300,
    cornYield: 10100,
    plantingDay: 6,
  },
  {
    code: "TB-05",
    county: "Kestrel County",
    soilSeries: "Dunmore",
    texture: "silty clay loam",
    tillage: "reduced",
    p: 18,
    k: 160,
    s: 8,
    om: 3.6,
    soyYield: 4300,
    cornYield: 12900,
    plantingDay: 14,
  },
  {
    code: "TB-06",
    county: "Kestrel County",
    soilSeries: "Harlan",
    texture: "silt loam",
    tillage: "conventional",
    p: 5,
    k: 140,
    s: 6,
    om: 2.9,
    soyYield: 3600,
    cornYield: 11000,
    plantingDay: 9,
  },
  {
    code: "TB-07",
    county: "Larkspur County",
    soilSeries: "Penwick",
    texture: "loam",
    tillage: "no-till",
    p: 11,
    k: 115,
    s: 5,
    om: 2.4,
    soyYield: 3800,
    cornYield: 11500,
    plantingDay: 11,
  },
  {
    code: "TB-08",
    county: "Larkspur County",
    soilSeries: "Tarrow",
    texture: "loamy sand",
    tillage: "strip-till",
    p: 15,
    k: 80,
    s: 3,
    om: 1.2,
    soyYield: 3100,
    cornYield: 9600,
    plantingDay: 5,
  },
  {
    code: "TB-09",
    county: "Millrace County",
    soilSeries: "Quillen",
    texture: "loam",
    tillage: "reduced",
    p: 28,
    k: 210,
    s: 10,
    om: 3.9,
    soyYield: 4400,
    cornYield: 13100,
    plantingDay: 15,
  },
  {
    code: "TB-10",
    county: "Millrace County",
    soilSeries: "Dunmore",
    texture: "silty clay loam",
    tillage: "no-till",
    p: 8,
    k: 175,
    s: 8,
    om: 3.4,
    soyYield: 4000,
    cornYield: 12100,
    plantingDay: 13,
  },
  {
    code: "TB-11",
    county: "Heron Flats County",
    soilSeries: "Marrow",
    texture: "clay loam",
    tillage: "conventional",
    p: 20,
    k: 98,
    s: 7,
    om: 3.2,
    soyYield: 4100,
    cornYield: 12000,
    plantingDay: 7,
  },
  {
    code: "TB-12",
    county: "Heron Flats County",
    soilSeries: "Penwick",
    texture: "sandy loam",
    tillage: "no-till",
    p: 7,
    k: 120,
    s: 4,
    om: 1.8,
    soyYield: 3400,
    cornYield: 10400,
    plantingDay: 10,
  },
];

export const siteByCode = new Map(demoSites.map((s) => [s.code, s]));
