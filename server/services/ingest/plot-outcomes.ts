import path from "node:path";
import { Worker } from "node:worker_threads";
import { responsesFromPlots, type SiteYearOutcome } from "./site-year-responses";

/** The plots with a yield of the site-years a file writes, flattened so they cross to a worker thread cheaply. */
export interface PlotOutcomeRequest {
  siteYearIds: number[];
  /** Start of each site-year's plots in the arrays below; one more entry than siteYearIds. */
  offsets: Int32Array;
  treatmentIds: Float64Array;
  blocks: Int32Array;
  yields: Float64Array;
  checkTreatmentIds: number[];
}

/** Below this many site-years the ANOVAs take less than starting a worker (about 0.4 s under tsx). */
export const WORKER_MIN_SITE_YEARS = 150;

export function plotOutcomesInline(request: PlotOutcomeRequest): Map<number, SiteYearOutcome> {
  const checks = new Set(request.checkTreatmentIds);
  const isCheck = (id: number) => checks.has(id);
  const out = new Map<number, SiteYearOutcome>();
  request.siteYearIds.forEach((id, i) => {
    const plots: { treatmentId: number; block: number; y: number }[] = [];
    for (let p = request.offsets[i]!; p < request.offsets[i + 1]!; p++) plots.push({ treatmentId: request.treatmentIds[p]!, block: request.blocks[p]!, y: request.yields[p]! });
    out.set(id, responsesFromPlots(plots, isCheck));
  });
  return out;
}

const workerEntry = path.join(__dirname, "responses-worker.ts");
const tsconfig = path.resolve(__dirname, "../../../tsconfig.json");

function inWorker(request: PlotOutcomeRequest): Promise<Map<number, SiteYearOutcome>> {
  return new Promise((resolve) => {
    // The worker loads TypeScript through tsx as the server does; an eval'd entry works whether or not the parent
    // process registered tsx itself (vitest does not).
    const worker = new Worker(`require("tsx/cjs"); require(${JSON.stringify(workerEntry)});`, {
      eval: true,
      env: { ...process.env, TSX_TSCONFIG_PATH: tsconfig },
    });
    let settled = false;
    const fallBack = () => {
      if (settled) return;
      settled = true;
      void worker.terminate();
      resolve(plotOutcomesInline(request));
    };
    worker.once("message", (entries: [number, SiteYearOutcome][]) => {
      settled = true;
      void worker.terminate();
      resolve(new Map(entries));
    });
    worker.once("error", fallBack);
    worker.once("exit", fallBack);
    // Copied, not transferred: the fallback still needs the arrays here.
    worker.postMessage(request);
  });
}

/**
 * The responses of the site-years a plots file writes, computed from the file's own rows rather than read back
 * after the insert. Large files are computed on a worker thread while PGlite (on the main thread) stores the plots.
 */
export function plotOutcomes(request: PlotOutcomeRequest): Promise<Map<number, SiteYearOutcome>> {
  if (request.siteYearIds.length < WORKER_MIN_SITE_YEARS) return Promise.resolve(plotOutcomesInline(request));
  return inWorker(request);
}
