import { shownDecimals } from "@/constants/precision";
import { cropStandards, kilogramsPerHectarePerBushelPerAcre, type StandardCrop } from "@/stats/units";

/** kg/ha with the crop's bu/ac beside it: curators think in one, the trials were keyed in the other. */
export function yieldWords(kgHa: number, crop: string, signed = false): string {
  const standard = cropStandards[crop as StandardCrop];
  const rounded = Number(Math.abs(kgHa).toFixed(shownDecimals("kg/ha")));
  // The sign of what is shown: a response of −0.4 kg/ha reads "0", not "−0".
  const sign = rounded === 0 ? "" : kgHa < 0 ? "−" : signed ? "+" : "";
  const kg = `${sign}${rounded.toLocaleString("en-US")} kg/ha`;
  if (!standard) return kg;
  const bu = (rounded / kilogramsPerHectarePerBushelPerAcre(standard.poundsPerBushel)).toFixed(shownDecimals("bu/ac"));
  return `${kg} (${Number(bu) === 0 ? "" : sign}${bu} bu/ac)`;
}

export const numberOr = (x: number | null | undefined, digits: number, dash = "–") =>
  x === null || x === undefined || !Number.isFinite(x) ? dash : x.toFixed(digits);
