import { QueryClient, type Query } from "@tanstack/react-query";
import { createSyncStoragePersister } from "@tanstack/query-sync-storage-persister";
import type { PersistQueryClientOptions } from "@tanstack/react-query-persist-client";
import { Platform } from "react-native";
import { ApiError } from "./api-error";

/** When this page (or app run) started: an answer older than this came from the device's saved copy. */
export const startedAt = Date.now();

/** Attempts at one request while the server answers 429, each after its Retry-After. */
const busyAttempts = 5;

/**
 * Whether to try a failed request again: after a 429 yes (after its Retry-After, up to busyAttempts); a request the
 * server refused as such (400–499) no; anything else once.
 */
function retryPolicy(failureCount: number, error: unknown): boolean {
  if (error instanceof ApiError && error.busy) return failureCount < busyAttempts;
  if (error instanceof ApiError && error.status >= 400 && error.status < 500) return false;
  return failureCount < 1;
}

function retryDelay(failureCount: number, error: unknown): number {
  if (error instanceof ApiError && error.busy) return Math.max(0, error.retryAt - Date.now());
  return Math.min(1000 * 2 ** failureCount, 30_000);
}

/** Answers kept on the device between visits: 30 days, read back when there is no signal. */
const savedForMs = 30 * 24 * 60 * 60_000;

export function makeQueryClient(): QueryClient {
  return new QueryClient({
    defaultOptions: { queries: { retry: retryPolicy, retryDelay, refetchOnWindowFocus: false, gcTime: savedForMs } },
  });
}

/**
 * Only published data are saved on the device (the analyses and the dataset list): never the session, accounts or
 * curators' drafts.
 */
const savedRoots = new Set(["analyses", "datasets"]);
const shouldSave = (query: Query) => query.state.status === "success" && savedRoots.has(String(query.queryKey[0]));

/** The saved-answers store: localStorage on the web; none on native (answers live for the run). */
export function persistOptions(): Omit<PersistQueryClientOptions, "queryClient"> | null {
  if (Platform.OS !== "web" || typeof window === "undefined") return null;
  let storage: Storage | undefined;
  try {
    storage = window.localStorage;
  } catch {
    // Storage can be off (some private windows): nothing is saved.
    return null;
  }
  return {
    persister: createSyncStoragePersister({ storage, key: "plotbank:answers:v1", throttleTime: 2000 }),
    maxAge: savedForMs,
    // Raise when the shape of saved answers changes, so old copies are dropped.
    buster: "1",
    dehydrateOptions: { shouldDehydrateQuery: shouldSave },
  };
}
