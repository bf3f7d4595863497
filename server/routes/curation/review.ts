import type { Router } from "express";
import { z } from "zod";
import { metaAnalysisResult } from "@/schemas/analysis";
import {
  commentParams,
  diffRowsQuery,
  draftPreviewQuery,
  reviewCommentBody,
  reviewComments,
  reviewSummary,
  reviewSummaryQuery,
  versionDiffRows,
  versionRowsPage,
  versionRowsParams,
  versionRowsQuery,
} from "@/schemas/review";
import type { AppContext } from "@/server/context";
import { currentUser, requireWriteScope } from "@/server/auth/guards";
import { routeModule } from "@/server/openapi/define-route";
import { problemResponses } from "@/server/openapi/registry";
import { assertCanView, versionById } from "@/server/services/curation/access";
import { diffRows } from "@/server/services/curation/diff";
import { draftPreview } from "@/server/services/curation/draft-preview";
import { addComment, listComments, resolveComment } from "@/server/services/curation/review-comments";
import { reviewSummary as summarise } from "@/server/services/curation/review-summary";
import { versionRows } from "@/server/services/curation/version-rows";
import { json } from "./docs";

const idParams = z.object({ id: z.uuid() });

/** The review screen's reads: rows, per-site-year results with flags, the draft's Evidence preview, diffs with values, comments. */
export function curationReviewRoutes(ctx: AppContext): Router {
  const { db, registry } = ctx;
  const { router, defineRoute } = routeModule(registry);

  defineRoute(
    {
      method: "get",
      path: "/api/v1/curation/versions/{id}/review",
      operationId: "getVersionReview",
      tags: ["Review"],
      summary: "Per-site-year results (responses, ANOVA F, p, LSD, CV) and review flags of a version, paged (its editors and reviewers)",
      description:
        "Each flag names its rule; `rules` gives every rule with its cut-off and source. Site-years are in code order; `flagged=true` keeps " +
        "those with a flag. `comparedTo` is the dataset's latest published version, the one the review diff compares against.",
      params: idParams,
      query: reviewSummaryQuery,
      responses: { 200: json(reviewSummary, "The site-years of this page"), ...problemResponses(400, 404) },
    },
    async ({ params: { id }, query }, req, res) => {
      res.set("Cache-Control", "no-store").json(await summarise(db, req.user, id, query));
    },
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/curation/versions/{id}/rows/{resource}",
      operationId: "listVersionRows",
      tags: ["Review"],
      summary: "A page of one resource's rows in a version, as its file prints them; drafts only for their editors and reviewers",
      params: versionRowsParams,
      query: versionRowsQuery,
      responses: { 200: json(versionRowsPage, "The rows of this page"), ...problemResponses(400, 404) },
    },
    async ({ params: { id, resource }, query }, req, res) => {
      const { version, dataset } = await versionById(db, id);
      await assertCanView(db, req.user, dataset, version);
      res.set("Cache-Control", "no-store").json(await versionRows(db, id, resource, query));
    },
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/curation/versions/{id}/preview/meta",
      operationId: "previewVersionMeta",
      tags: ["Review"],
      summary: "Draft preview: the Evidence meta-analysis run on this version's responses alone (its editors and reviewers; not published)",
      description:
        "The same filters and options as /api/v1/analyses/meta, without dataset and version: the one version read is this one, whatever its " +
        "state. Anyone but the dataset's editors and reviewers gets 404. The answer is not a published result.",
      params: idParams,
      query: draftPreviewQuery,
      responses: { 200: json(metaAnalysisResult, "The analysis of this version alone"), ...problemResponses(400, 404) },
    },
    async ({ params: { id }, query }, req, res) => {
      res.set("Cache-Control", "no-store").json(await draftPreview(db, req.user, id, query));
    },
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/curation/diff/rows",
      operationId: "diffVersionRows",
      tags: ["Curation"],
      summary: "A page of one resource's differing rows between two versions, with old and new values cell by cell",
      query: diffRowsQuery,
      responses: { 200: json(versionDiffRows, "The rows of this page"), ...problemResponses(400, 404) },
    },
    async ({ query: { from, to, resource, ...paging } }, req, res) => {
      for (const versionId of [from, to]) {
        const { version, dataset } = await versionById(db, versionId);
        await assertCanView(db, req.user, dataset, version);
      }
      res.set("Cache-Control", "no-store").json(await diffRows(db, from, to, resource, paging));
    },
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/curation/versions/{id}/comments",
      operationId: "listReviewComments",
      tags: ["Review"],
      summary: "Reviewers' comments on the site-years of a version, oldest first (its editors and reviewers)",
      params: idParams,
      responses: { 200: json(reviewComments, "The comments"), ...problemResponses(404) },
    },
    async ({ params: { id } }, req, res) => {
      res.set("Cache-Control", "no-store").json({ items: await listComments(db, req.user, id) });
    },
  );

  defineRoute(
    {
      method: "post",
      path: "/api/v1/curation/versions/{id}/comments",
      operationId: "createReviewComment",
      tags: ["Review"],
      summary: "Comment on one site-year of a version in review (reviewer); the comment stays through returns and re-submissions",
      guards: [requireWriteScope],
      params: idParams,
      body: { json: reviewCommentBody },
      responses: { 201: json(reviewComments, "Every comment on the version"), ...problemResponses(400, 401, 403, 404, 409) },
    },
    async ({ params: { id }, body }, req, res) => {
      await addComment(db, currentUser(req), id, body);
      res.status(201).json({ items: await listComments(db, req.user, id) });
    },
  );

  defineRoute(
    {
      method: "post",
      path: "/api/v1/curation/versions/{id}/comments/{commentId}/resolve",
      operationId: "resolveReviewComment",
      tags: ["Review"],
      summary: "Mark a comment as dealt with (the dataset's editors and reviewers); it stays on the version",
      guards: [requireWriteScope],
      params: commentParams,
      responses: { 200: json(reviewComments, "Every comment on the version"), ...problemResponses(401, 403, 404) },
    },
    async ({ params: { id, commentId } }, req, res) => {
      await resolveComment(db, currentUser(req), id, commentId);
      res.json({ items: await listComments(db, req.user, id) });
    },
  );

  return router;
}
