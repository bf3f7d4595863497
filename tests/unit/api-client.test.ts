import { afterEach, describe, expect, it, vi } from "vitest";
import { z } from "zod";
import { api, apiNoContent, setApiBaseUrl } from "@/lib/api-client";
import { ApiError } from "@/lib/api-error";
import { health } from "@/schemas/dataset";

// fetch is the platform's; the client and its schemas run for real.
const calls: { url: string; init: RequestInit | undefined }[] = [];
function answer(make: () => Response | Promise<Response>) {
  vi.stubGlobal("fetch", async (url: string, init?: RequestInit) => {
    calls.push({ url, init });
    return make();
  });
}
const json = (body: unknown, status = 200, type = "application/json") =>
  new Response(JSON.stringify(body), { status, headers: { "Content-Type": type } });

const healthy = { status: "ok", version: "0.1.0", database: { kind: "pglite", connected: true, latencyMs: 1.5 } };

afterEach(() => {
  vi.unstubAllGlobals();
  calls.length = 0;
  setApiBaseUrl("");
});

/** The rejection of `promise`, which must be an ApiError. */
async function apiErrorOf(promise: Promise<unknown>): Promise<ApiError> {
  const error = await promise.then(
    () => {
      throw new Error("expected the call to fail");
    },
    (e: unknown) => e,
  );
  expect(error).toBeInstanceOf(ApiError);
  return error as ApiError;
}

describe("the API client", () => {
  it("returns the parsed body of an OK answer and sends JSON with the session cookie", async () => {
    answer(() => json(healthy));
    setApiBaseUrl("http://plotbank.test/");
    await expect(api("/api/v1/health", health, { method: "POST", body: { a: 1 } })).resolves.toEqual(healthy);
    expect(calls[0]!.url).toBe("http://plotbank.test/api/v1/health");
    expect(calls[0]!.init).toMatchObject({ method: "POST", credentials: "include", body: '{"a":1}' });
    expect(calls[0]!.init!.headers).toMatchObject({ Accept: "application/json", "Content-Type": "application/json" });
  });

  it("an OK answer in the wrong shape is an ApiError of kind shape naming the field", async () => {
    answer(() => json({ ...healthy, database: { ...healthy.database, connected: "yes" } }));
    const error = await apiErrorOf(api("/api/v1/health", health));
    expect(error.kind).toBe("shape");
    expect(error.status).toBe(200);
    expect(error.offline).toBe(false);
    expect(error.message).toContain("database.connected");
    expect(error.cause).toBeInstanceOf(z.ZodError);
  });

  it("an OK answer that is not JSON is an ApiError of kind not-json naming what came instead", async () => {
    answer(
      () =>
        new Response("<!doctype html><title>Sign in to the network</title>", {
          status: 200,
          headers: { "Content-Type": "text/html; charset=utf-8" },
        }),
    );
    const error = await apiErrorOf(api("/api/v1/health", health));
    expect(error.kind).toBe("not-json");
    expect(error.status).toBe(200);
    expect(error.message).toContain("text/html");
    expect(error.cause).toBeInstanceOf(SyntaxError);
  });

  it("no answer at all is an offline ApiError with status 0", async () => {
    answer(() => Promise.reject(new TypeError("fetch failed")));
    const error = await apiErrorOf(api("/api/v1/health", health));
    expect(error.kind).toBe("offline");
    expect(error.offline).toBe(true);
    expect(error.status).toBe(0);
    expect(error.message).toMatch(/offline/);
  });

  it("a body cut off half-way is an offline ApiError too", async () => {
    answer(() => {
      const body = new ReadableStream({
        start(controller) {
          controller.enqueue(new TextEncoder().encode('{"status":"o'));
          controller.error(new TypeError("terminated"));
        },
      });
      return new Response(body, { status: 200, headers: { "Content-Type": "application/json" } });
    });
    const error = await apiErrorOf(api("/api/v1/health", health));
    expect(error.kind).toBe("offline");
  });

  it("a problem+json answer is an ApiError carrying the problem and its field errors", async () => {
    const problem = {
      type: "about:blank",
      title: "Bad request",
      status: 400,
      detail: "The request is not valid.",
      errors: [{ field: "body.email", message: "Invalid email address" }],
    };
    answer(() => json(problem, 400, "application/problem+json"));
    const error = await apiErrorOf(api("/api/v1/session", health, { method: "POST", body: {} }));
    expect(error.kind).toBe("status");
    expect(error.status).toBe(400);
    expect(error.problem).toMatchObject(problem);
    expect(error.message).toBe("The request is not valid.");
    expect(error.fieldErrors()).toEqual({ email: "Invalid email address" });
  });

  it("a non-OK answer that is not a problem (a proxy's page) is an ApiError with the status alone", async () => {
    answer(() => new Response("<html>Bad gateway</html>", { status: 502, headers: { "Content-Type": "text/html" } }));
    const error = await apiErrorOf(apiNoContent("/api/v1/session", { method: "DELETE" }));
    expect(error.kind).toBe("status");
    expect(error.status).toBe(502);
    expect(error.problem).toBeNull();
    expect(error.message).toBe("The server answered 502.");
  });

  it("204 parses as no content, and a schema that wants a body makes it a shape error", async () => {
    answer(() => new Response(null, { status: 204 }));
    await expect(api("/api/v1/x", z.undefined())).resolves.toBeUndefined();
    await expect(apiNoContent("/api/v1/x", { method: "DELETE" })).resolves.toBeUndefined();
    expect((await apiErrorOf(api("/api/v1/health", health))).kind).toBe("shape");
  });

  it("a cancelled request rejects with the AbortError itself, not an ApiError", async () => {
    answer(() => Promise.reject(new DOMException("The operation was aborted.", "AbortError")));
    await expect(api("/api/v1/health", health)).rejects.toMatchObject({ name: "AbortError" });
  });
});
