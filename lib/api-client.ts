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
 * Fetch a JSON resource and parse it with its shared zod schema. Every failure becomes an ApiError (see its `kind`):
 * no answer, a non-OK answer with the server's problem+json, or an OK answer that is not JSON or not the contract's
 * shape. Only a cancellation (AbortError) passes through as it is, as React Query expects.
 */
export async function api<T extends z.ZodType>(path: string, schema: T, options: RequestOptions = {}): Promise<z.infer<T>> {
  const res = await send(path, options);
  const body = res.status === 204 ? undefined : await readJson(res, path);
  const parsed = schema.safeParse(body);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    const where = issue ? ` (${issue.path.map(String).join(".") || "the whole answer"}: ${issue.message})` : "";
    throw new ApiError(
      res.status,
      null,
      `The server's answer to ${path} is not in the form this app expects${where}. Reloading the page gets the app that matches the server.`,
      { kind: "shape", cause: parsed.error },
    );
  }
  return parsed.data;
}

export async function apiNoContent(path: string, options: RequestOptions = {}): Promise<void> {
  await send(path, options);
}

const offlineMessage = "You appear to be offline: Plotbank could not be reached.";

async function readJson(res: Response, path: string): Promise<unknown> {
  let text: string;
  try {
    text = await res.text();
  } catch (error) {
    // The connection dropped while the body was arriving.
    if ((error as Error).name === "AbortError") throw error;
    throw new ApiError(0, null, offlineMessage, { cause: error });
  }
  try {
    return JSON.parse(text);
  } catch (error) {
    const type = res.headers.get("content-type")?.split(";")[0];
    throw new ApiError(
      res.status,
      null,
      `The server's answer to ${path} is not JSON${type ? ` but ${type}` : ""}. Something between this app and Plotbank (a proxy or a sign-in page of the network) may have answered instead.`,
      {
        kind: "not-json",
        cause: error,
      },
    );
  }
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
    throw new ApiError(0, null, offlineMessage, { cause: error });
  }
  if (!res.ok) {
    let problem = null;
    try {
      problem = problemSchema.parse(await res.json());
    } catch {
      // Not problem+json (a proxy error page, say): report the status alone.
    }
    const retryAfter = res.status === 429 ? Number(res.headers.get("Retry-After")) || undefined : undefined;
    throw new ApiError(res.status, problem, problem?.detail ?? problem?.title ?? `The server answered ${res.status}.`, { retryAfter });
  }
  return res;
}
