import busboy from "busboy";
import type { Request, Router } from "express";
import type { Readable } from "node:stream";
import { z } from "zod";
import {
  draftRows,
  draftRowsQuery,
  cellEditBody,
  cellEditResult,
  uploadOptions,
  uploadRejection,
  uploadResult,
  type UploadOptions,
} from "@/schemas/curation";
import { hasControlCharacter, line } from "@/schemas/safe-text";
import { resourceName } from "@/schemas/table-schema";
import type { AppContext } from "@/server/context";
import { currentUser, requireUser, requireWriteScope } from "@/server/auth/guards";
import { HttpProblem, zodProblems } from "@/server/errors";
import { routeModule } from "@/server/openapi/define-route";
import { problemResponses } from "@/server/openapi/registry";
import { assertCanEdit, assertCanView, versionById } from "@/server/services/curation/access";
import { tooLarge } from "@/server/services/ingest/csv-stream";
import { ingestUpload } from "@/server/services/ingest/ingest-upload";
import { editCell, rowKey } from "@/server/services/curation/cell-edit";
import { fieldsOf, resourceRowsPage } from "@/server/services/curation/resource-csv";
import { json } from "./docs";

const params = z.object({ id: z.uuid(), resource: resourceName });
const optionQuery = z
  .object({
    mapping: z.string().max(20_000).optional().describe('JSON object, CSV header → field, e.g. {"Yield (bu/ac)":"yield_kg_ha"}'),
    units: z.string().max(2_000).optional().describe('JSON object, e.g. {"yield":"bu/ac","yieldMoisture":"harvest"}'),
    mode: z.enum(["merge", "replace"]).optional(),
    filename: line().max(200).optional(),
  })
  .strict();

/** Options as JSON text (query parameters or multipart fields), parsed with the shared contract. */
function parseOptions(raw: { mapping?: string; units?: string; mode?: string }, where: string): UploadOptions {
  const parsed: Record<string, unknown> = {};
  for (const key of ["mapping", "units"] as const) {
    if (raw[key] === undefined || raw[key] === "") continue;
    try {
      parsed[key] = JSON.parse(raw[key]!);
    } catch {
      throw new HttpProblem(400, "Bad request", `${key} must be a JSON object.`, {
        errors: [{ field: `${where}.${key}`, message: "not valid JSON" }],
      });
    }
  }
  if (raw.mode) parsed.mode = raw.mode;
  const result = uploadOptions.safeParse(parsed);
  if (!result.success)
    throw new HttpProblem(400, "Bad request", "The upload options are not valid.", { errors: zodProblems(result.error, where) });
  return result.data;
}

const cutOff = () =>
  new HttpProblem(400, "Bad request", "The multipart body ended before its closing boundary: the upload was cut off. Nothing was stored.", {
    errors: [{ field: "body", message: "incomplete multipart body" }],
  });

/**
 * The file part of a multipart body; fields sent before the file are its options. Every parser error becomes a 400:
 * busboy throws on a missing boundary and emits "Unexpected end of form" on the file stream when the body is cut off,
 * and an error event nobody listens to would end the whole process. `failed()` tells the caller the stream broke.
 */
function multipartFile(
  req: Request,
  limitBytes: number,
): Promise<{ stream: Readable; filename: string; fields: Record<string, string>; failed: () => boolean }> {
  return new Promise((resolve, reject) => {
    const fields: Record<string, string> = {};
    let found = false;
    let broken = false;
    let bb: ReturnType<typeof busboy>;
    try {
      // One byte over the limit lets the reader see the file is too large (busboy would cut it silently).
      bb = busboy({ headers: req.headers, limits: { fileSize: limitBytes + 1, files: 1, fields: 10, fieldSize: 64 * 1024 } });
    } catch (error) {
      req.resume();
      reject(
        new HttpProblem(400, "Bad request", `The multipart body cannot be read: ${(error as Error).message}.`, {
          errors: [{ field: "body", message: "no multipart boundary" }],
        }),
      );
      return;
    }
    bb.on("field", (name, value) => {
      fields[name] = value;
    });
    bb.on("file", (_name, stream, info) => {
      found = true;
      stream.on("error", () => {
        broken = true;
      });
      const filename = info.filename || "upload.csv";
      if (hasControlCharacter(filename)) {
        stream.resume();
        reject(
          new HttpProblem(400, "Bad request", "The file name holds a control character.", {
            errors: [{ field: "body.file", message: "the file name contains a control character" }],
          }),
        );
        return;
      }
      resolve({ stream, filename, fields, failed: () => broken });
    });
    bb.on("error", () => {
      broken = true;
      req.unpipe(bb);
      req.resume();
      reject(cutOff());
    });
    bb.on("close", () => {
      if (!found)
        reject(
          new HttpProblem(400, "Bad request", "The multipart body has no file part.", {
            errors: [{ field: "body.file", message: "missing" }],
          }),
        );
    });
    req.pipe(bb);
  });
}

export function curationUploadRoutes(ctx: AppContext): Router {
  const { db, registry, config } = ctx;
  const { router, defineRoute } = routeModule(registry);

  defineRoute(
    {
      method: "post",
      path: "/api/v1/curation/versions/{id}/uploads/{resource}",
      operationId: "uploadResource",
      tags: ["Curation"],
      summary: "Upload one resource's CSV into a draft; stored only if the whole file validates",
      description:
        "Send multipart/form-data with a `file` part (fields `mapping`, `units`, `mode` before it), or the CSV itself as " +
        "text/csv with the options as query parameters. UTF-8 (a BOM is fine); comma, semicolon or tab delimited (detected). " +
        "Problems name the file, the row (1-based data row; the header is not counted, so a spreadsheet's line is row + 1), " +
        "the column and the value. A rejected file is answered 422 with the same problems and changes nothing in the draft. " +
        `Files over the upload limit (PLOTBANK_UPLOAD_LIMIT_MB, default 200 MB) get 413.`,
      guards: [requireWriteScope],
      params,
      query: optionQuery,
      body: {
        stream: {
          "text/csv": { schema: z.string() },
          "multipart/form-data": {
            schema: z.object({
              mapping: z.string().optional(),
              units: z.string().optional(),
              mode: z.string().optional(),
              file: z.string(),
            }),
          },
        },
      },
      responses: {
        201: json(uploadResult, "Accepted and stored; responses recomputed"),
        422: {
          description: "Rejected: problem+json with `errors` (located problems), `problems`, `reportId` and the file's sha256",
          content: { "application/problem+json": { schema: uploadRejection } },
        },
        ...problemResponses(400, 401, 403, 404, 409, 413),
      },
    },
    async ({ params: { id, resource }, query }, req, res) => {
      const user = currentUser(req);
      const { dataset } = await versionById(db, id);
      await assertCanEdit(db, user, dataset);
      const declared = Number(req.headers["content-length"] ?? 0);
      const multipart = req.is("multipart/form-data");
      // Multipart framing adds a few hundred bytes; anything far beyond the limit is refused before reading it.
      if (declared > config.uploadLimitBytes + (multipart ? 64 * 1024 : 0)) {
        req.resume();
        throw tooLarge(config.uploadLimitBytes);
      }
      let source: Readable = req;
      let filename = query.filename ?? `${resource}.csv`;
      let options: UploadOptions;
      let partFailed = () => false;
      if (multipart) {
        const part = await multipartFile(req, config.uploadLimitBytes);
        source = part.stream;
        partFailed = part.failed;
        filename = part.filename;
        options = parseOptions({ ...query, ...part.fields }, "body");
      } else {
        if (!req.is(["text/csv", "text/plain", "application/octet-stream"])) {
          req.resume();
          throw new HttpProblem(415, "Unsupported media type", "Send the CSV as multipart/form-data (field `file`) or as a text/csv body.");
        }
        options = parseOptions(query, "query");
      }
      let result;
      try {
        result = await ingestUpload(ctx, { versionId: id, resource, filename, source, options, userId: user.id });
      } catch (error) {
        source.resume();
        req.resume();
        throw partFailed() ? cutOff() : error;
      }
      if (result.accepted) {
        res.status(201).json(result);
        return;
      }
      const { errors, warnings, ...rest } = result;
      const located = result.problems
        .filter((p) => p.severity === "error")
        .map((p) => ({
          file: p.file,
          row: p.row ?? undefined,
          column: p.column ?? undefined,
          value: p.value ?? undefined,
          message: p.message,
        }));
      throw new HttpProblem(
        422,
        "Unprocessable content",
        `${filename}: ${errors} error(s) and ${warnings} warning(s); nothing was stored. See report ${result.reportId}.`,
        {
          errors: located,
          errorCount: errors,
          warningCount: warnings,
          ...rest,
        },
      );
    },
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/curation/versions/{id}/rows/{resource}",
      operationId: "getDraftRows",
      tags: ["Curation"],
      summary: "A page of one resource's rows of a version, as its CSV prints them (the desk's data grid)",
      guards: [requireUser],
      params,
      query: draftRowsQuery,
      responses: { 200: json(draftRows, "The rows"), ...problemResponses(400, 401, 404) },
    },
    async ({ params: { id, resource }, query }, req, res) => {
      const { version, dataset } = await versionById(db, id);
      await assertCanView(db, req.user, dataset, version);
      const fields = fieldsOf(version.tableSchema, resource);
      const page = await resourceRowsPage(db, id, fields, resource, query.limit, query.offset);
      res.json({ resource, fields, keyFields: rowKey[resource], ...page });
    },
  );

  defineRoute(
    {
      method: "post",
      path: "/api/v1/curation/versions/{id}/cells",
      operationId: "editCell",
      tags: ["Curation"],
      summary: "Change one cell of a draft, with a reason; checked and written as a merge upload of that row",
      description:
        "The row named by `key` (its primary-key fields as the resource CSV prints them) gets `value` in `field`, in the stored " +
        "unit. The edited row goes through the same checks as an upload in merge mode, on the version as the edit would leave " +
        "it; responses are recomputed, and the version's changelog gets a line with the old and new value and the reason. " +
        "A refused edit is a 422 whose `errors` name `body.value` (or the key or field) and changes nothing.",
      guards: [requireWriteScope],
      params: z.object({ id: z.uuid() }),
      body: { json: cellEditBody },
      responses: {
        200: json(cellEditResult, "Applied; the version's changelog records it"),
        ...problemResponses(400, 401, 403, 404, 409, 422),
      },
    },
    async ({ params: { id }, body }, req, res) => {
      const user = currentUser(req);
      const { dataset } = await versionById(db, id);
      await assertCanEdit(db, user, dataset);
      res.json(await editCell(ctx, id, user.id, body));
    },
  );

  return router;
}
