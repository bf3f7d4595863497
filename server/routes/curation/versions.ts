import type { Router } from "express";
import { z } from "zod";
import {
  approveBody,
  diffQuery,
  reportQuery,
  returnBody,
  reviewQueue,
  submitBody,
  tableSchemaUpdate,
  validationReport,
  versionDetail,
  versionDiff,
  versionPatch,
  withdrawBody,
} from "@/schemas/curation";
import type { AppContext } from "@/server/context";
import { currentUser, requireRole, requireUser, requireWriteScope } from "@/server/auth/guards";
import { routeModule } from "@/server/openapi/define-route";
import { problemResponses } from "@/server/openapi/registry";
import { assertCanView, canEditDataset, isReviewer, versionById } from "@/server/services/curation/access";
import { diffVersions } from "@/server/services/curation/diff";
import { getReport, reportCsv } from "@/server/services/curation/reports";
import { approveVersion, returnVersion, reviewQueue as listQueue, submitVersion, withdrawVersion } from "@/server/services/curation/review";
import { requeueVersionDoi } from "@/server/services/curation/version-doi";
import { patchVersion, putTableSchema, versionDetail as describe } from "@/server/services/curation/versions";
import { json } from "./docs";

const idParams = z.object({ id: z.uuid() });
const reportParams = z.object({
  id: z.uuid(),
  report: z
    .string()
    .regex(/^[0-9a-f-]{36}(\.csv)?$/i)
    .describe("The report id; end it with .csv for CSV"),
});

export function curationVersionRoutes(ctx: AppContext): Router {
  const { db, registry } = ctx;
  const { router, defineRoute } = routeModule(registry);

  defineRoute(
    {
      method: "get",
      path: "/api/v1/curation/versions/{id}",
      operationId: "getCurationVersion",
      tags: ["Curation"],
      summary: "A version with counts, uploads, reports and the suggested bump; drafts only for their editors and reviewers",
      params: idParams,
      responses: { 200: json(versionDetail, "The version"), ...problemResponses(404) },
    },
    async ({ params: { id } }, req, res) => {
      const { version, dataset } = await versionById(db, id);
      await assertCanView(db, req.user, dataset, version);
      res.json(await describe(ctx, req.user, id));
    },
  );

  defineRoute(
    {
      method: "patch",
      path: "/api/v1/curation/versions/{id}",
      operationId: "updateVersion",
      tags: ["Curation"],
      summary: "Change a draft's semantic version or changelog",
      guards: [requireWriteScope],
      params: idParams,
      body: { json: versionPatch },
      responses: { 200: json(versionDetail, "The draft"), ...problemResponses(400, 401, 403, 404, 409) },
    },
    async ({ params: { id }, body }, req, res) => {
      await patchVersion(db, currentUser(req), id, body);
      res.json(await describe(ctx, req.user, id));
    },
  );

  defineRoute(
    {
      method: "put",
      path: "/api/v1/curation/versions/{id}/table-schema",
      operationId: "replaceTableSchema",
      tags: ["Curation"],
      summary: "Replace a draft's data dictionary (Table Schema per resource)",
      guards: [requireWriteScope],
      params: idParams,
      body: { json: tableSchemaUpdate },
      responses: { 200: json(versionDetail, "The draft"), ...problemResponses(400, 401, 403, 404, 409) },
    },
    async ({ params: { id }, body }, req, res) => {
      await putTableSchema(db, currentUser(req), id, body);
      res.json(await describe(ctx, req.user, id));
    },
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/curation/versions/{id}/reports/{report}",
      operationId: "getValidationReport",
      tags: ["Curation"],
      summary: "A validation report, filterable; end the id with .csv for the whole (filtered) report as CSV",
      guards: [requireUser],
      params: reportParams,
      query: reportQuery,
      responses: {
        200: {
          description: "The report",
          content: { "application/json": { schema: validationReport }, "text/csv": { schema: z.string() } },
        },
        ...problemResponses(400, 404),
      },
    },
    async ({ params: { id, report }, query: filter }, req, res) => {
      const { version, dataset } = await versionById(db, id);
      await assertCanView(db, req.user, dataset, version);
      const acceptedOnly = !isReviewer(req.user) && !(await canEditDataset(db, req.user, dataset));
      if (report.endsWith(".csv")) {
        const reportId = report.slice(0, -4);
        res
          .type("text/csv; charset=utf-8")
          .attachment(`validation-report-${reportId}.csv`)
          .send(await reportCsv(db, id, reportId, filter, acceptedOnly));
        return;
      }
      res.json(await getReport(db, id, report, filter, acceptedOnly));
    },
  );

  defineRoute(
    {
      method: "post",
      path: "/api/v1/curation/versions/{id}/submit",
      operationId: "submitVersion",
      tags: ["Review"],
      summary: "Submit a draft for review (changelog entry required)",
      guards: [requireWriteScope],
      params: idParams,
      body: { json: submitBody },
      responses: { 200: json(versionDetail, "The version, now in review"), ...problemResponses(400, 401, 403, 404, 409) },
    },
    async ({ params: { id }, body: { changelog } }, req, res) => {
      await submitVersion(ctx, currentUser(req), id, changelog);
      res.json(await describe(ctx, req.user, id));
    },
  );

  defineRoute(
    {
      method: "post",
      path: "/api/v1/curation/versions/{id}/approve",
      operationId: "approveVersion",
      tags: ["Review"],
      summary: "Publish a version in review (reviewer; not one you created or submitted)",
      guards: [requireWriteScope, requireRole("reviewer")],
      params: idParams,
      body: { json: approveBody },
      responses: { 200: json(versionDetail, "The published version"), ...problemResponses(400, 401, 403, 404, 409) },
    },
    async ({ params: { id }, body: { comment } }, req, res) => {
      await approveVersion(ctx, currentUser(req), id, comment);
      res.json(await describe(ctx, req.user, id));
    },
  );

  defineRoute(
    {
      method: "post",
      path: "/api/v1/curation/versions/{id}/return",
      operationId: "returnVersion",
      tags: ["Review"],
      summary: "Return a version in review to draft, with a comment (reviewer)",
      guards: [requireWriteScope, requireRole("reviewer")],
      params: idParams,
      body: { json: returnBody },
      responses: { 200: json(versionDetail, "The version, a draft again"), ...problemResponses(400, 401, 403, 404, 409) },
    },
    async ({ params: { id }, body: { comment } }, req, res) => {
      await returnVersion(ctx, currentUser(req), id, comment);
      res.json(await describe(ctx, req.user, id));
    },
  );

  defineRoute(
    {
      method: "post",
      path: "/api/v1/curation/versions/{id}/withdraw",
      operationId: "withdrawVersion",
      tags: ["Review"],
      summary: "Withdraw a published version, with a reason; a tombstone keeps its metadata (reviewer, dataset editors)",
      guards: [requireWriteScope],
      params: idParams,
      body: { json: withdrawBody },
      responses: { 200: json(versionDetail, "The withdrawn version (tombstone)"), ...problemResponses(400, 401, 403, 404, 409) },
    },
    async ({ params: { id }, body: { reason } }, req, res) => {
      await withdrawVersion(ctx, currentUser(req), id, reason);
      res.json(await describe(ctx, req.user, id));
    },
  );

  defineRoute(
    {
      method: "post",
      path: "/api/v1/curation/versions/{id}/doi/requeue",
      operationId: "requeueVersionDoi",
      tags: ["Review"],
      summary: "Send a failed or pending DOI registration again now (reviewer, dataset editors); it runs in the background",
      guards: [requireWriteScope],
      params: idParams,
      responses: {
        202: json(versionDetail, "The version; its DOI registration is pending again"),
        ...problemResponses(401, 403, 404, 409),
      },
    },
    async ({ params: { id } }, req, res) => {
      await requeueVersionDoi(ctx, currentUser(req), id);
      res.status(202).json(await describe(ctx, req.user, id));
    },
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/curation/diff",
      operationId: "diffVersions",
      tags: ["Curation"],
      summary: "What changed between two versions of a dataset, and the suggested semantic-version bump",
      query: diffQuery,
      responses: { 200: json(versionDiff, "The diff"), ...problemResponses(400, 404) },
    },
    async ({ query: { from, to } }, req, res) => {
      for (const id of [from, to]) {
        const { version, dataset } = await versionById(db, id);
        await assertCanView(db, req.user, dataset, version);
      }
      res.json(await diffVersions(db, from, to));
    },
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/curation/review-queue",
      operationId: "listReviewQueue",
      tags: ["Review"],
      summary: "Versions waiting for review (reviewer)",
      guards: [requireRole("reviewer")],
      responses: { 200: json(reviewQueue, "Oldest submission first"), ...problemResponses(401, 403) },
    },
    async (_input, req, res) => {
      res.json({ items: await listQueue(ctx, currentUser(req)) });
    },
  );

  return router;
}
