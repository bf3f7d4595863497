import { asc, inArray } from "drizzle-orm";
import type { Db } from "@/db/client";
import { applications } from "@/db/schema";
import { placementLabels } from "@/constants/vocabulary";

type Application = Pick<
  typeof applications.$inferSelect,
  "treatmentId" | "product" | "grade" | "placement" | "nLbAc" | "p2o5LbAc" | "k2oLbAc" | "sLbAc"
>;

const nutrientNames = [
  ["nLbAc", "N"],
  ["p2o5LbAc", "P2O5"],
  ["k2oLbAc", "K2O"],
  ["sLbAc", "S"],
] as const;

/** A rate as a curator writes it: whole pounds from 10 up, one decimal below. */
const pounds = (value: number) => (value >= 10 ? value.toFixed(0) : Number(value.toFixed(1)).toString());

/**
 * One application in words, e.g. "MAP 11-52-0, 52 lb P2O5 + 11 lb N/ac, 2x2 band": product and grade, the nutrients
 * it supplies (largest first, labels in oxides as the trade writes them) and its placement.
 */
function applicationLabel(a: Omit<Application, "treatmentId">): string {
  const product = a.product.includes(a.grade) ? a.product : `${a.product} ${a.grade}`;
  const rates = nutrientNames
    .map(([key, name]) => ({ name, value: a[key] }))
    .filter((r) => r.value >= 0.05)
    .sort((x, y) => y.value - x.value)
    .map((r) => `${pounds(r.value)} lb ${r.name}`);
  const placement = (placementLabels[a.placement as keyof typeof placementLabels] ?? a.placement).replace(/ \(.*\)$/, "");
  return [product, rates.length ? `${rates.join(" + ")}/ac` : null, placement.charAt(0).toLowerCase() + placement.slice(1)]
    .filter(Boolean)
    .join(", ");
}

/** Labels of the named treatments from their applications (several applications joined by "; "). */
export async function treatmentLabels(db: Db, treatmentIds: number[]): Promise<Map<number, string>> {
  const labels = new Map<number, string>();
  if (treatmentIds.length === 0) return labels;
  const rows: Application[] = await db
    .select({
      treatmentId: applications.treatmentId,
      product: applications.product,
      grade: applications.grade,
      placement: applications.placement,
      nLbAc: applications.nLbAc,
      p2o5LbAc: applications.p2o5LbAc,
      k2oLbAc: applications.k2oLbAc,
      sLbAc: applications.sLbAc,
    })
    .from(applications)
    .where(inArray(applications.treatmentId, [...new Set(treatmentIds)]))
    .orderBy(asc(applications.id));
  for (const row of rows) {
    const label = applicationLabel(row);
    labels.set(row.treatmentId, labels.has(row.treatmentId) ? `${labels.get(row.treatmentId)}; ${label}` : label);
  }
  return labels;
}
