import { Router } from "express";
import { z } from "zod";
import {
  approveBody, diffQuery, reportQuery, returnBody, reviewQueue, submitBody, tableSchemaUpdate, validationReport, versionDetail, versionDiff, versionPatch, withdrawBody,
} from "@/schemas/curation";
import type { AppContext } from "@/server/context";
import { currentUser, requireRole, requireUser, requireWriteScope } from "@/server/auth/guards";
import { problemResponses } from "@/server/openapi/registry";
import { assertCanView, canEditDataset, isReviewer, versionById } from "@/server/services/curation/access";
import { diffVersions } from "@/server/services/curation/diff";
import { getReport, reportCsv } from "@/server/services/curation/reports";
import { approveVersion, returnVersion, reviewQueue as listQueue, submitVersion, withdrawVersion } from "@/server/services/curation/review";
import { requeueVersionDoi } from "@/server/services/curation/version-doi";
import { patchVersion, putTableSchema, versionDetail as describe } from "@/server/services/curation/versions";
import { parseBody, parseParams, parseQuery } from "@/server/validate";
import { json, security } from "./docs";

const idParams = z.object({ id: z.uuid() });
const reportParams = z.object({ id: z.uuid(), report: z.string().regex(/^[0-9a-f-]{36}(\.csv)?$/i) });

export function curationVersionRoutes(ctx: AppContext): Router {
  const { db, registry } = ctx;
  const router = Router();

  registry.registerPath({
    method: "get", path: "/api/v1/curation/versions/{id}", tags: ["Curation"],
    summary: "A version with counts, uploads, reports and the suggested bump; drafts only for their editors and reviewers", security,
    request: { params: idParams },
    responses: { 200: json(versionDetail, "The version"), ...problemResponses(404) },
  });
  router.get("/curation/versions/:id", async (req, res) => {
    const { id } = parseParams(idParams, req);
    const { version, dataset } = await versionById(db, id);
    await assertCanView(db, req.user, dataset, version);
    res.json(await describe(ctx, req.user, id));
  });

  registry.registerPath({
    method: "patch", path: "/api/v1/curation/versions/{id}", tags: ["Curation"], summary: "Change a draft's semantic version or changelog", security,
    request: { params: idParams, body: { content: { "application/json": { schema: versionPatch } } } },
    responses: { 200: json(versionDetail, "The draft"), ...problemResponses(400, 401, 403, 404, 409) },
  });
  router.patch("/curation/versions/:id", requireWriteScope, async (req, res) => {
    const { id } = parseParams(idParams, req);
    const body = parseBody(versionPatch, req);
    await patchVersion(db, currentUser(req), id, body);
    res.json(await describe(ctx, req.user, id));
  });

  registry.registerPath({
    method: "put", path: "/api/v1/curation/versions/{id}/table-schema", tags: ["Curation"], summary: "Replace a draft's data dictionary (Table Schema per resource)", security,
    request: { params: idParams, body: { content: { "application/json": { schema: tableSchemaUpdate } } } },
    responses: { 200: json(versionDetail, "The draft"), ...problemResponses(400, 401, 403, 404, 409) },
  });
  router.put("/curation/versions/:id/table-schema", requireWriteScope, async (req, res) => {
    const { id } = parseParams(idParams, req);
    const body = parseBody(tableSchemaUpdate, req);
    await putTableSchema(db, currentUser(req), id, body);
    res.json(await describe(ctx, req.user, id));
  });

  registry.registerPath({
    method: "get", path: "/api/v1/curation/versions/{id}/reports/{report}", tags: ["Curation"],
    summary: "A validation report, filterable; end the id with .csv for the whole (filtered) report as CSV", security,
    request: { params: z.object({ id: z.uuid(), report: z.string().describe("The report id; end it with .csv for CSV") }), query: reportQuery },
    responses: { 200: { description: "The report", content: { "application/json": { schema: validationReport }, "text/csv": { schema: z.string() } } }, ...problemResponses(400, 404) },
  });
  router.get("/curation/versions/:id/reports/:report", requireUser, async (req, res) => {
    const { id, report } = parseParams(reportParams, req);
    const { version, dataset } = await versionById(db, id);
    await assertCanView(db, req.user, dataset, version);
    const filter = parseQuery(reportQuery, req);
    const acceptedOnly = !isReviewer(req.user) && !(await canEditDataset(db, req.user, dataset));
    if (report.endsWith(".csv")) {
      const reportId = report.slice(0, -4);
      res.type("text/csv; charset=utf-8").attachment(`validation-report-${reportId}.csv`).send(await reportCsv(db, id, reportId, filter, acceptedOnly));
      return;
    }
    res.json(await getReport(db, id, report, filter, acceptedOnly));
  });

  registry.registerPath({
    method: "post", path: "/api/v1/curation/versions/{id}/submit", tags: ["Review"], summary: "Submit a draft for review (changelog entry required)", security,
    request: { params: idParams, body: { content: { "application/json": { schema: submitBody } } } },
    responses: { 200: json(versionDetail, "The version, now in review"), ...problemResponses(400, 401, 403, 404, 409) },
  });
  router.post("/curation/versions/:id/submit", requireWriteScope, async (req, res) => {
    const { id } = parseParams(idParams, req);
    const { changelog } = parseBody(submitBody, req);
    await submitVersion(ctx, currentUser(req), id, changelog);
    res.json(await describe(ctx, req.user, id));
  });

  registry.registerPath({
    method: "post", path: "/api/v1/curation/versions/{id}/approve", tags: ["Review"],
    summary: "Publish a version in review (reviewer; not one you created or submitted)", security,
    request: { params: idParams, body: { content: { "application/json": { schema: approveBody } } } },
    responses: { 200: json(versionDetail, "The published version"), ...problemResponses(400, 401, 403, 404, 409) },
  });
  router.post("/curation/versions/:id/approve", requireWriteScope, requireRole("reviewer"), async (req, res) => {
    const { id } = parseParams(idParams, req);
    const { comment } = parseBody(approveBody, req);
    await approveVersion(ctx, currentUser(req), id, comment);
    res.json(await describe(ctx, req.user, id));
  });

  registry.registerPath({
    method: "post", path: "/api/v1/curation/versions/{id}/return", tags: ["Review"], summary: "Return a version in review to draft, with a comment (reviewer)", security,
    request: { params: idParams, body: { content: { "application/json": { schema: returnBody } } } },
    responses: { 200: json(versionDetail, "The version, a draft again"), ...problemResponses(400, 401, 403, 404, 409) },
  });
  router.post("/curation/versions/:id/return", requireWriteScope, requireRole("reviewer"), async (req, res) => {
    const { id } = parseParams(idParams, req);
    const { comment } = parseBody(returnBody, req);
    await returnVersion(ctx, currentUser(req), id, comment);
    res.json(await describe(ctx, req.user, id));
  });

  registry.registerPath({
    method: "post", path: "/api/v1/curation/versions/{id}/withdraw", tags: ["Review"],
    summary: "Withdraw a published version, with a reason; a tombstone keeps its metadata (reviewer, dataset editors)", security,
    request: { params: idParams, body: { content: { "application/json": { schema: withdrawBody } } } },
    responses: { 200: json(versionDetail, "The withdrawn version (tombstone)"), ...problemResponses(400, 401, 403, 404, 409) },
  });
  router.post("/curation/versions/:id/withdraw", requireWriteScope, async (req, res) => {
    const { id } = parseParams(idParams, req);
    const { reason } = parseBody(withdrawBody, req);
    await withdrawVersion(ctx, currentUser(req), id, reason);
    res.json(await describe(ctx, req.user, id));
  });

  registry.registerPath({
    method: "post", path: "/api/v1/curation/versions/{id}/doi/requeue", tags: ["Review"],
    summary: "Send a failed or pending DOI registration again now (reviewer, dataset editors); it runs in the background", security,
    request: { params: idParams },
    responses: { 202: json(versionDetail, "The version; its DOI registration is pending again"), ...problemResponses(401, 403, 404, 409) },
  });
  router.post("/curation/versions/:id/doi/requeue", requireWriteScope, async (req, res) => {
    const { id } = parseParams(idParams, req);
    await requeueVersionDoi(ctx, currentUser(req), id);
    res.status(202).json(await describe(ctx, req.user, id));
  });

  registry.registerPath({
    method: "get", path: "/api/v1/curation/diff", tags: ["Curation"], summary: "What changed between two versions of a dataset, and the suggested semantic-version bump", security,
    request: { query: diffQuery },
    responses: { 200: json(versionDiff, "The diff"), ...problemResponses(400, 404) },
  });
  router.get("/curation/diff", async (req, res) => {
    const { from, to } = parseQuery(diffQuery, req);
    for (const id of [from, to]) {
      const { version, dataset } = await versionById(db, id);
      await assertCanView(db, req.user, dataset, version);
    }
    res.json(await diffVersions(db, from, to));
  });

  registry.registerPath({
    method: "get", path: "/api/v1/curation/review-queue", tags: ["Review"], summary: "Versions waiting for review (reviewer)", security,
    responses: { 200: json(reviewQueue, "Oldest submission first"), ...problemResponses(401, 403) },
  });
  router.get("/curation/review-queue", requireRole("reviewer"), async (req, res) => {
    res.json({ items: await listQueue(ctx, currentUser(req)) });
  });

  return router;
}
