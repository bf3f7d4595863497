import busboy from "busboy";
import type { Request, Router } from "express";
import type { Readable } from "node:stream";
import { z } from "zod";
import {
  cellEditBody,
  cellEditResult,
  uploadOptions,
  uploadRejection,
  uploadResult,
  sheetNamesRejection,
  workbookRejection,
  workbookUploadResult,
  type UploadOptions,
  type ValidationProblem,
} from "@/schemas/curation";
import { hasControlCharacter, line } from "@/schemas/safe-text";
import { resourceName } from "@/schemas/table-schema";
import type { AppContext } from "@/server/context";
import { currentUser, requireWriteScope } from "@/server/auth/guards";
import { HttpProblem, zodProblems } from "@/server/errors";
import { routeModule } from "@/server/openapi/define-route";
import { problemResponses } from "@/server/openapi/registry";
import { assertCanEdit, versionById } from "@/server/services/curation/access";
import { tooLarge } from "@/server/services/ingest/csv-stream";
import { ingestUpload } from "@/server/services/ingest/ingest-upload";
import { ingestWorkbook } from "@/server/services/ingest/ingest-workbook";
import { editCell } from "@/server/services/curation/cell-edit";
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
  defaultName = "upload.csv",
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
      const filename = info.filename || defaultName;
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

/** An upload request's file and options: a multipart part, or the body itself when its type is one of `bodyTypes`. */
async function uploadRequest(
  req: Request,
  query: { mapping?: string; units?: string; mode?: string; filename?: string },
  limitBytes: number,
  how: { defaultName: string; bodyTypes: string[]; refusal: string; mapping: boolean },
): Promise<{ source: Readable; filename: string; options: UploadOptions; partFailed: () => boolean }> {
  const declared = Number(req.headers["content-length"] ?? 0);
  const multipart = req.is("multipart/form-data");
  // Multipart framing adds a few hundred bytes; anything far beyond the limit is refused before reading it.
  if (declared > limitBytes + (multipart ? 64 * 1024 : 0)) {
    req.resume();
    throw tooLarge(limitBytes);
  }
  if (!multipart) {
    if (!req.is(how.bodyTypes)) {
      req.resume();
      throw new HttpProblem(415, "Unsupported media type", how.refusal);
    }
    return { source: req, filename: query.filename ?? how.defaultName, options: parseOptions(query, "query"), partFailed: () => false };
  }
  const part = await multipartFile(req, limitBytes, how.defaultName);
  if (!how.mapping && part.fields.mapping) {
    part.stream.resume();
    throw new HttpProblem(400, "Bad request", "Column mappings are for CSV uploads; in a workbook, name each column after its field.", {
      errors: [{ field: "body.mapping", message: "not accepted with a workbook" }],
    });
  }
  return {
    source: part.stream,
    filename: part.filename,
    options: parseOptions({ ...query, ...part.fields }, "body"),
    partFailed: part.failed,
  };
}

/** Runs the ingest; a failure drains the request, and a multipart body that broke off is named as such. */
async function ingesting<T>(req: Request, upload: { source: Readable; partFailed: () => boolean }, run: () => Promise<T>): Promise<T> {
  try {
    return await run();
  } catch (error) {
    upload.source.resume();
    req.resume();
    throw upload.partFailed() ? cutOff() : error;
  }
}

/** The located errors of a rejected file's problems, as the 422 lists them. */
const locatedErrors = (problems: ValidationProblem[]) =>
  problems
    .filter((p) => p.severity === "error")
    .map((p) => ({
      file: p.file,
      row: p.row ?? undefined,
      column: p.column ?? undefined,
      value: p.value ?? undefined,
      message: p.message,
    }));

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
      const upload = await uploadRequest(req, query, config.uploadLimitBytes, {
        defaultName: `${resource}.csv`,
        bodyTypes: ["text/csv", "text/plain", "application/octet-stream"],
        refusal: "Send the CSV as multipart/form-data (field `file`) or as a text/csv body.",
        mapping: true,
      });
      const { filename } = upload;
      const result = await ingesting(req, upload, () =>
        ingestUpload(ctx, { versionId: id, resource, filename, source: upload.source, options: upload.options, userId: user.id }),
      );
      if (result.accepted) {
        res.status(201).json(result);
        return;
      }
      const { errors, warnings, ...rest } = result;
      const located = locatedErrors(result.problems);
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

  const xlsxType = "application/vnd.openxmlformats-officedocument.spreadsheetml.sheet";
  defineRoute(
    {
      method: "post",
      path: "/api/v1/curation/versions/{id}/workbook-uploads",
      operationId: "uploadWorkbook",
      tags: ["Curation"],
      summary: "Upload an .xlsx workbook with one sheet per resource into a draft; every sheet is stored, or none",
      description:
        "Send multipart/form-data with a `file` part (fields `units`, `mode` before it), or the workbook itself as " +
        `${xlsxType} with the options as query parameters. Each sheet is named after its resource (sites, site_years, soil_tests, ` +
        "treatments, plots, summaries; any case; a README sheet is skipped) and is checked exactly as that resource's CSV, in the " +
        "order resources refer to each other. Formula cells are read as their last calculated values and reported as warnings; date " +
        "cells, and whole numbers in date fields (spreadsheet date serials), are read as YYYY-MM-DD. Rows are numbered as in CSV: a " +
        "data row's number is its spreadsheet line minus the header's line. A sheet with errors rejects the whole workbook (422): " +
        "nothing is stored, and the sheets after it are not checked. A file that is not an .xlsx workbook, is encrypted or is empty is " +
        "a 400; sheets named after no resource are a 422 naming the sheets found and the names expected. Column mappings are for " +
        "CSV uploads only: name the columns after the data dictionary's fields.",
      guards: [requireWriteScope],
      params: z.object({ id: z.uuid() }),
      query: optionQuery.omit({ mapping: true }),
      body: {
        stream: {
          [xlsxType]: { schema: z.string() },
          "multipart/form-data": {
            schema: z.object({ units: z.string().optional(), mode: z.string().optional(), file: z.string() }),
          },
        },
      },
      responses: {
        201: json(workbookUploadResult, "Every sheet accepted and stored; responses recomputed"),
        422: {
          description:
            "Rejected: problem+json with `errors` (the rejected sheet's located problems; `file` names the workbook and sheet) and the per-sheet results, or the sheet names found and expected",
          content: { "application/problem+json": { schema: z.union([workbookRejection, sheetNamesRejection]) } },
        },
        ...problemResponses(400, 401, 403, 404, 409, 413),
      },
    },
    async ({ params: { id }, query }, req, res) => {
      const user = currentUser(req);
      const { dataset } = await versionById(db, id);
      await assertCanEdit(db, user, dataset);
      const upload = await uploadRequest(req, query, config.uploadLimitBytes, {
        defaultName: "workbook.xlsx",
        bodyTypes: [xlsxType, "application/octet-stream"],
        refusal: `Send the workbook as multipart/form-data (field \`file\`) or as a ${xlsxType} body.`,
        mapping: false,
      });
      const { filename } = upload;
      const result = await ingesting(req, upload, () =>
        ingestWorkbook(ctx, { versionId: id, filename, source: upload.source, options: upload.options, userId: user.id }),
      );
      if (result.accepted) {
        res.status(201).json(result);
        return;
      }
      const { errors, warnings, ...rest } = result;
      const rejected = result.sheets.find((s) => s.status === "rejected");
      const located = locatedErrors(rejected?.problems ?? []);
      throw new HttpProblem(
        422,
        "Unprocessable content",
        `${filename}: sheet ${rejected?.sheet ?? "?"} has ${errors} error(s); nothing in the workbook was stored. See report ${rejected?.reportId ?? "?"}.`,
        { errors: located, errorCount: errors, warningCount: warnings, ...rest },
      );
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
