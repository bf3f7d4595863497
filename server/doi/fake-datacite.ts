import { randomBytes } from "node:crypto";
import { existsSync, mkdirSync, readFileSync, renameSync, writeFileSync } from "node:fs";
import type { Server } from "node:http";
import type { AddressInfo } from "node:net";
import path from "node:path";
import express, { type ErrorRequestHandler, type Express, type RequestHandler } from "express";
import { controlledListProblems, missingMandatoryProperties, type DataCiteAttributes, type DataCiteError } from "./datacite-metadata";

export interface FakeDataCiteOptions {
  user: string;
  password: string;
  /** Prefixes this account may mint under. */
  prefixes: string[];
  /** Keep the DOIs in this JSON file as well as in memory, so they survive a restart. */
  storeFile?: string;
}

export interface FakeDataCite {
  app: Express;
  /** Every DOI the fake holds, by lower-case DOI. */
  records: Map<string, DataCiteAttributes>;
  /** Listen on a loopback port (0: any free one); resolves to the base URL. Starting again reuses the last port. */
  start(port?: number): Promise<string>;
  stop(): Promise<void>;
  readonly url: string | undefined;
}

/**
 * A stand-in for the DataCite REST API (JSON:API over HTTP with Basic auth) that behaves like the real one where
 * Plotbank depends on it: POST /dois mints, PUT /dois/:id updates (or creates), GET reads, a taken DOI is a 422,
 * and a DOI is only made findable when the mandatory properties are there.
 */
export function createFakeDataCite(options: FakeDataCiteOptions): FakeDataCite {
  const records = new Map<string, DataCiteAttributes>(loadStore(options.storeFile));
  const save = () => {
    if (!options.storeFile) return;
    mkdirSync(path.dirname(options.storeFile), { recursive: true });
    const tmp = `${options.storeFile}.tmp`;
    writeFileSync(tmp, JSON.stringify(Object.fromEntries(records), null, 2));
    renameSync(tmp, options.storeFile);
  };

  const app = express();
  app.disable("x-powered-by");
  app.use(express.json({ type: ["application/json", "application/vnd.api+json"], limit: "1mb" }));
  app.use(basicAuth(options.user, options.password));

  app.get("/heartbeat", (_req, res) => {
    res.type("text/plain").send("OK");
  });

  app.get("/dois", (_req, res) => {
    const data = [...records.entries()].map(([id, attributes]) => ({ id, type: "dois", attributes }));
    send(res, 200, { data, meta: { total: data.length } });
  });

  app.get("/dois/{*id}", (req, res) => {
    const id = doiParam(req.params);
    const found = records.get(id);
    if (!found) return errors(res, 404, [{ status: "404", title: "The resource you are looking for doesn't exist." }]);
    send(res, 200, { data: { id, type: "dois", attributes: found } });
  });

  app.post("/dois", (req, res) => {
    const body = documentOf(req.body);
    if (!body.ok) return errors(res, body.status, body.errors);
    const incoming = body.attributes;
    let doi = incoming.doi?.trim().toLowerCase();
    if (!doi && incoming.prefix)
      doi = `${incoming.prefix.trim().toLowerCase()}/${randomBytes(4)
        .toString("hex")
        .replace(/(.{4})/, "$1-")}`;
    const denied = prefixProblem(doi, options.prefixes);
    if (denied) return errors(res, denied.status, [denied.error]);
    if (records.has(doi!)) return errors(res, 422, [{ status: "422", source: "doi", title: "This DOI has already been taken" }]);
    const result = applyEvent({ ...incoming, doi }, undefined);
    if (!result.ok) return errors(res, 422, result.errors);
    records.set(doi!, result.record);
    save();
    send(res, 201, { data: { id: doi, type: "dois", attributes: result.record } });
  });

  app.put("/dois/{*id}", (req, res) => {
    const id = doiParam(req.params);
    const body = documentOf(req.body);
    if (!body.ok) return errors(res, body.status, body.errors);
    const denied = prefixProblem(id, options.prefixes);
    if (denied) return errors(res, denied.status, [denied.error]);
    const existing = records.get(id);
    const result = applyEvent({ ...existing, ...body.attributes, doi: id }, existing);
    if (!result.ok) return errors(res, 422, result.errors);
    records.set(id, result.record);
    save();
    send(res, existing ? 200 : 201, { data: { id, type: "dois", attributes: result.record } });
  });

  app.use((_req, res) => errors(res, 404, [{ status: "404", title: "The resource you are looking for doesn't exist." }]));
  const onError: ErrorRequestHandler = (error: { status?: number; type?: string }, _req, res, _next) => {
    const status = error.status && error.status < 500 ? error.status : 500;
    errors(res, status, [
      { status: String(status), title: error.type === "entity.parse.failed" ? "The body is not valid JSON" : "Internal error" },
    ]);
  };
  app.use(onError);

  let server: Server | undefined;
  let lastPort = 0;
  let url: string | undefined;
  return {
    app,
    records,
    get url() {
      return url;
    },
    async start(port = lastPort) {
      if (server) return url!;
      const s = app.listen(port, "127.0.0.1");
      await new Promise<void>((resolve, reject) => {
        s.once("listening", resolve);
        s.once("error", reject);
      });
      server = s;
      lastPort = (s.address() as AddressInfo).port;
      url = `http://127.0.0.1:${lastPort}`;
      return url;
    },
    async stop() {
      const s = server;
      server = undefined;
      if (!s) return;
      s.closeAllConnections();
      await new Promise<void>((resolve) => s.close(() => resolve()));
    },
  };
}

type Outcome = { ok: true; record: DataCiteAttributes } | { ok: false; errors: DataCiteError[] };

/** Draft DOIs need only an identifier; `publish` (findable) and `register` need the mandatory metadata, within the controlled lists. */
function applyEvent(attributes: DataCiteAttributes, existing: DataCiteAttributes | undefined): Outcome {
  const { event, prefix: _prefix, ...rest } = attributes;
  const state =
    event === "publish" ? "findable" : event === "register" ? "registered" : event === "hide" ? "registered" : (existing?.state ?? "draft");
  if (state !== "draft") {
    const missing = [...missingMandatoryProperties(rest), ...controlledListProblems(rest)];
    if (missing.length) return { ok: false, errors: missing.map((e) => ({ status: "422", ...e })) };
  }
  const now = new Date().toISOString();
  return { ok: true, record: { ...rest, state, created: existing?.created ?? now, updated: now } };
}

function documentOf(body: unknown): { ok: true; attributes: DataCiteAttributes } | { ok: false; status: number; errors: DataCiteError[] } {
  const data = (body as { data?: { type?: unknown; attributes?: unknown } } | undefined)?.data;
  if (!data || typeof data !== "object")
    return { ok: false, status: 400, errors: [{ status: "400", source: "data", title: "The body must be a JSON:API document with data" }] };
  if (data.type !== "dois")
    return { ok: false, status: 422, errors: [{ status: "422", source: "data.type", title: 'data.type must be "dois"' }] };
  if (!data.attributes || typeof data.attributes !== "object")
    return { ok: false, status: 422, errors: [{ status: "422", source: "data.attributes", title: "data.attributes is missing" }] };
  return { ok: true, attributes: data.attributes as DataCiteAttributes };
}

function prefixProblem(doi: string | undefined, prefixes: string[]): { status: number; error: DataCiteError } | undefined {
  if (!doi) return { status: 422, error: { status: "422", source: "doi", title: "Can't be blank: give a doi or a prefix" } };
  const prefix = doi.split("/")[0] ?? "";
  if (!/^10\.\d{4,9}\/\S+$/.test(doi)) return { status: 422, error: { status: "422", source: "doi", title: `${doi} is not a valid DOI` } };
  if (!prefixes.map((p) => p.toLowerCase()).includes(prefix)) {
    return { status: 403, error: { status: "403", source: "doi", title: `This account may not mint DOIs under the prefix ${prefix}` } };
  }
  return undefined;
}

function doiParam(params: Record<string, unknown>): string {
  const id = params.id;
  // Express has already decoded each segment; a DOI's slash may arrive encoded (%2F) or as a path separator.
  return (Array.isArray(id) ? id.join("/") : String(id)).toLowerCase();
}

function basicAuth(user: string, password: string): RequestHandler {
  const expected = `Basic ${Buffer.from(`${user}:${password}`).toString("base64")}`;
  return (req, res, next) => {
    if (req.headers.authorization === expected) return next();
    res.setHeader("WWW-Authenticate", 'Basic realm="DataCite"');
    errors(res, 401, [{ status: "401", title: "Bad credentials" }]);
  };
}

function send(res: Parameters<RequestHandler>[1], status: number, body: unknown) {
  res.status(status).type("application/vnd.api+json").send(JSON.stringify(body));
}

function errors(res: Parameters<RequestHandler>[1], status: number, list: DataCiteError[]) {
  send(res, status, { errors: list });
}

function loadStore(file: string | undefined): [string, DataCiteAttributes][] {
  if (!file || !existsSync(file)) return [];
  try {
    return Object.entries(JSON.parse(readFileSync(file, "utf8")) as Record<string, DataCiteAttributes>);
  } catch (error) {
    throw new Error(`The fake DOI store ${file} is not valid JSON; move it aside to start afresh (${(error as Error).message}).`);
  }
}
