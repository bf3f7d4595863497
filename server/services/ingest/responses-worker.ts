import { parentPort } from "node:worker_threads";
import { plotOutcomesInline, type PlotOutcomeRequest } from "./plot-outcomes";

/** Worker-thread side of plotOutcomes: the same pure computation, on the second core. */
parentPort!.on("message", (request: PlotOutcomeRequest) => {
  parentPort!.postMessage([...plotOutcomesInline(request)]);
});
