import type { z } from "zod";
import { problemSchema } from "@/schemas/problem";
import { ApiError } from "./api-error";

/** The API's base: same origin in the web app; tests and scripts may point elsewhere. */
let baseUrl = "";
export function setApiBaseUrl(url: string) {
  baseUrl = url.replace(/\/$/, "");
}
export const apiUrl = (path: string) => `${baseUrl}${path}`;

export interface RequestOptions {
  method?: "GET" | "POST" | "PUT" | "PATCH" | "DELETE";
  body?: unknown;
  signal?: AbortSignal;
  headers?: Record<string, string>;
}

/**
 * Fetch a JSON resource and parse it with its shared zod schema. Every failure becomes an ApiError: status 0 when the
 * network is down, the server's problem+json otherwise.
 */
export async function api<T extends z.ZodType>(path: string, schema: T, options: RequestOptions = {}): Promise<z.infer<T>> {
  const res = await send(path, options);
  if (res.status === 204) return schema.parse(undefined);
  return schema.parse(await res.json());
}

export async function apiNoContent(path: string, options: RequestOptions = {}): Promise<void> {
  await send(path, options);
}

export async function send(path: string, options: RequestOptions = {}): Promise<Response> {
  const isForm = typeof FormData !== "undefined" && options.body instanceof FormData;
  let res: Response;
  try {
    res = await fetch(apiUrl(path), {
      method: options.method ?? "GET",
      credentials: "include",
      signal: options.signal,
      headers: {
        Accept: "application/json",
        ...(options.body !== undefined && !isForm ? { "Content-Type": "application/json" } : {}),
        ...options.headers,
      },
      body: options.body === undefined ? undefined : isForm ? (options.body as FormData) : JSON.stringify(options.body),
    });
  } catch (error) {
    if ((error as Error).name === "AbortError") throw error;
    throw new ApiError(0, null, "You appear to be offline: Plotbank could not be reached.");
  }
  if (!res.ok) {
    let problem = null;
    try {
      problem = problemSchema.parse(await res.json());
    } catch {
      // Not problem+json (a proxy error page, say): report the status alone.
    }
    throw new ApiError(res.status, problem, problem?.detail ?? problem?.title ?? `The server answered ${res.status}.`);
  }
  return res;
}
