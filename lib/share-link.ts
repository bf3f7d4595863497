import { metaOptionShape, type CiMethod, type EffectMeasure, type Grouping, type TauMethod, type YieldUnit } from "@/schemas/analysis";
import { filtersToQuery, trialFilterShape, type TrialFilters } from "@/schemas/filters";

/**
 * What the Evidence screen shows, held in the URL so a shared link reproduces the screen. Prices are the exception:
 * they are read from a link that carries them, but the screen's own URL and its API requests never do; only a share
 * link the user asks to include them in has them (see `shareUrl`).
 */
export interface EvidenceState {
  filters: Partial<TrialFilters>;
  effect: EffectMeasure;
  method: TauMethod;
  ci: CiMethod;
  groupBy: Grouping;
  units: YieldUnit;
  /** What to compare: yield, stand, vigour, test-weight, moisture, or a measure a data dictionary adds. */
  measure: string;
  price?: number;
  productCost?: number;
  applicationCost?: number;
}

export const defaultEvidenceState: EvidenceState = {
  filters: {},
  effect: "md",
  method: "REML",
  ci: "hksj",
  groupBy: "soilTestClass",
  units: "bu/ac",
  measure: "yield",
};

export const priceKeys = ["price", "productCost", "applicationCost"] as const;
export type PriceKey = (typeof priceKeys)[number];
export type Prices = Partial<Record<PriceKey, number>>;

type Params = Record<string, string | string[] | undefined>;

const filterKeys = Object.keys(trialFilterShape) as (keyof TrialFilters)[];
/** Every key the screen writes to its URL; the router gets `undefined` for the ones not set, to clear them. */
const evidenceParamKeys = [...filterKeys, "effect", "method", "ci", "groupBy", "units", "measure", ...priceKeys] as const;

function parseField<T>(
  schema: { safeParse(v: unknown): { success: true; data: T } | { success: false } },
  raw: string | string[] | undefined,
): T | undefined {
  if (raw === undefined || raw === "") return undefined;
  const result = schema.safeParse(raw);
  return result.success ? result.data : undefined;
}

/**
 * Reads a link's parameters with the same zod fields the API validates with. A value the API would refuse is dropped
 * (the screen shows the rest) rather than breaking the page.
 */
export function evidenceStateFromParams(params: Params): EvidenceState {
  const filters: Record<string, unknown> = {};
  for (const key of filterKeys) {
    const value = parseField(trialFilterShape[key] as never, params[key]);
    if (value !== undefined) filters[key] = value;
  }
  if (filters.version && !filters.dataset) delete filters.version;
  const state: EvidenceState = {
    filters: filters as Partial<TrialFilters>,
    effect: parseField(metaOptionShape.effect, params.effect) ?? defaultEvidenceState.effect,
    method: parseField(metaOptionShape.method, params.method) ?? defaultEvidenceState.method,
    ci: parseField(metaOptionShape.ci, params.ci) ?? defaultEvidenceState.ci,
    groupBy: parseField(metaOptionShape.groupBy, params.groupBy) ?? defaultEvidenceState.groupBy,
    units: parseField(metaOptionShape.units, params.units) ?? defaultEvidenceState.units,
    measure: parseField(metaOptionShape.measure, params.measure) ?? defaultEvidenceState.measure,
  };
  for (const key of priceKeys) {
    const value = parseField(metaOptionShape[key], params[key]);
    if (value !== undefined) state[key] = value;
  }
  return state;
}

/**
 * The screen's URL parameters: canonical filters and options only where they differ from the defaults. Prices only
 * with `withPrices` (a share link the user chose to include them in).
 */
export function paramsFromEvidenceState(state: EvidenceState, options: { withPrices?: boolean } = {}): Record<string, string> {
  const out: Record<string, string> = { ...filtersToQuery(state.filters) };
  for (const key of ["effect", "method", "ci", "groupBy", "units", "measure"] as const) {
    if (state[key] !== defaultEvidenceState[key]) out[key] = state[key];
  }
  if (options.withPrices) for (const key of priceKeys) if (state[key] !== undefined) out[key] = String(state[key]);
  return out;
}

/**
 * The API query that gives the screen's numbers, without prices: the device computes the break-even and its chances
 * from the predictive distribution in the answer. (The API's own default is no grouping, so groupBy is always named.)
 */
export function apiParamsFromEvidenceState(state: EvidenceState): Record<string, string> {
  const out: Record<string, string> = { ...paramsFromEvidenceState(state), groupBy: state.groupBy };
  return Object.fromEntries(Object.entries(out).sort(([a], [b]) => a.localeCompare(b)));
}

/** Query string with the readable separators kept (commas and slashes need no escaping in a query). */
function toQueryString(params: Record<string, string>): string {
  const qs = new URLSearchParams(params).toString().replace(/%2C/gi, ",").replace(/%2F/gi, "/");
  return qs ? `?${qs}` : "";
}

export const metaApiPath = (state: EvidenceState) => `/api/v1/analyses/meta${toQueryString(apiParamsFromEvidenceState(state))}`;
/** The seed-safety question of the screen: its filters but placement (the answer compares placements), and its measure. */
export const seedSafetyApiPath = (state: EvidenceState) => {
  const { placement: _placement, ...filters } = state.filters;
  return `/api/v1/analyses/seed-safety${toQueryString({ ...filtersToQuery(filters), measure: state.measure })}`;
};
/** A link to the screen; the prices go in only when the user asks for them. */
export const shareUrl = (origin: string, state: EvidenceState, options: { withPrices?: boolean } = {}) =>
  `${origin.replace(/\/$/, "")}/${toQueryString(paramsFromEvidenceState(state, options))}`;
/** A copy-paste curl line; the URL is single-quoted so a shell does not read & or ?. */
export const curlCommand = (url: string) => `curl -H 'Accept: application/json' '${url.replace(/'/g, "'\\''")}'`;

/** The params object for router.setParams: every evidence key, unset ones (and the prices) as undefined so they leave the URL. */
export function routerParams(state: EvidenceState): Record<string, string | undefined> {
  const set = paramsFromEvidenceState(state);
  return Object.fromEntries(evidenceParamKeys.map((key) => [key, set[key]]));
}

/** Toggle a value in a list filter; an empty list removes the filter. */
export function toggleListValue<T extends string>(list: readonly T[] | undefined, value: T): T[] | undefined {
  const next = list?.includes(value) ? list.filter((v) => v !== value) : [...(list ?? []), value];
  return next.length ? next : undefined;
}

export function countActiveFilters(filters: Partial<TrialFilters>): number {
  return Object.values(filters).filter((v) => v !== undefined).length;
}
