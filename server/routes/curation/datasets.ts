import type { Router } from "express";
import { z } from "zod";
import {
  curationDataset,
  curationDatasetList,
  datasetCreate,
  datasetPatch,
  editorParams,
  editorsBody,
  versionCreate,
  versionDetail,
} from "@/schemas/curation";
import type { AppContext } from "@/server/context";
import { currentUser, requireRole, requireUser, requireWriteScope } from "@/server/auth/guards";
import { notFound } from "@/server/errors";
import { routeModule } from "@/server/openapi/define-route";
import { problemResponses } from "@/server/openapi/registry";
import { canEditDataset, datasetBySlug, isReviewer } from "@/server/services/curation/access";
import {
  addEditor,
  createDataset,
  datasetDetail,
  listCurationDatasets,
  patchDataset,
  removeEditor,
} from "@/server/services/curation/datasets";
import { createVersion, versionDetail as describeVersion } from "@/server/services/curation/versions";
import { json } from "./docs";

const slugParams = z.object({ slug: z.string().min(1).max(120) });

export function curationDatasetRoutes(ctx: AppContext): Router {
  const { db, registry } = ctx;
  const { router, defineRoute } = routeModule(registry);

  defineRoute(
    {
      method: "post",
      path: "/api/v1/datasets",
      operationId: "createDataset",
      tags: ["Curation"],
      summary: "Create a dataset (curator)",
      guards: [requireWriteScope, requireRole("curator")],
      body: { json: datasetCreate },
      responses: { 201: json(curationDataset, "The new dataset, without versions yet"), ...problemResponses(400, 401, 403, 409) },
    },
    async ({ body }, req, res) => {
      res.status(201).json(await createDataset(db, currentUser(req), body));
    },
  );

  defineRoute(
    {
      method: "patch",
      path: "/api/v1/datasets/{slug}",
      operationId: "updateDataset",
      tags: ["Curation"],
      summary: "Edit a dataset's metadata (owner, editors, admin)",
      guards: [requireWriteScope],
      params: slugParams,
      body: { json: datasetPatch },
      responses: { 200: json(curationDataset, "The dataset"), ...problemResponses(400, 401, 403, 404) },
    },
    async ({ params: { slug }, body }, req, res) => {
      res.json(await patchDataset(db, currentUser(req), await datasetBySlug(db, slug), body));
    },
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/curation/datasets",
      operationId: "listCurationDatasets",
      tags: ["Curation"],
      summary: "Datasets I work on, drafts included (all for reviewers and admins)",
      guards: [requireRole("curator", "reviewer")],
      responses: { 200: json(curationDatasetList, "Datasets with all their versions"), ...problemResponses(401, 403) },
    },
    async (_input, req, res) => {
      res.json({ items: await listCurationDatasets(db, currentUser(req)) });
    },
  );

  defineRoute(
    {
      method: "get",
      path: "/api/v1/curation/datasets/{slug}",
      operationId: "getCurationDataset",
      tags: ["Curation"],
      summary: "One dataset with every version (editors and reviewers)",
      guards: [requireUser],
      params: slugParams,
      responses: { 200: json(curationDataset, "The dataset"), ...problemResponses(401, 404) },
    },
    async ({ params: { slug } }, req, res) => {
      const dataset = await datasetBySlug(db, slug);
      const user = currentUser(req);
      if (!isReviewer(user) && !(await canEditDataset(db, user, dataset))) throw notFound(`No dataset is called "${slug}".`);
      res.json(await datasetDetail(db, user, dataset));
    },
  );

  defineRoute(
    {
      method: "post",
      path: "/api/v1/curation/datasets/{slug}/editors",
      operationId: "addDatasetEditor",
      tags: ["Curation"],
      summary: "Share a dataset with another curator (owner, admin)",
      guards: [requireWriteScope, requireRole("curator")],
      params: slugParams,
      body: { json: editorsBody },
      responses: { 200: json(curationDataset, "The dataset with its editors"), ...problemResponses(400, 401, 403, 404, 409) },
    },
    async ({ params: { slug }, body: { email } }, req, res) => {
      res.json(await addEditor(db, currentUser(req), await datasetBySlug(db, slug), email));
    },
  );

  defineRoute(
    {
      method: "delete",
      path: "/api/v1/curation/datasets/{slug}/editors/{userId}",
      operationId: "removeDatasetEditor",
      tags: ["Curation"],
      summary: "Stop sharing a dataset with an editor (owner, admin)",
      guards: [requireWriteScope, requireRole("curator")],
      params: editorParams,
      responses: { 200: json(curationDataset, "The dataset with its remaining editors"), ...problemResponses(401, 403, 404) },
    },
    async ({ params: { slug, userId } }, req, res) => {
      res.json(await removeEditor(db, currentUser(req), await datasetBySlug(db, slug), userId));
    },
  );

  defineRoute(
    {
      method: "post",
      path: "/api/v1/datasets/{slug}/versions",
      operationId: "createVersion",
      tags: ["Curation"],
      summary: "Start a new draft version: a copy of the latest published version, or empty for the first",
      guards: [requireWriteScope, requireRole("curator")],
      params: slugParams,
      body: { json: versionCreate },
      responses: { 201: json(versionDetail, "The new draft"), ...problemResponses(400, 401, 403, 404, 409) },
    },
    async ({ params: { slug }, body }, req, res) => {
      const user = currentUser(req);
      const v = await createVersion(ctx, user, await datasetBySlug(db, slug), body.semver);
      res
        .status(201)
        .location(`/api/v1/curation/versions/${v.id}`)
        .json(await describeVersion(ctx, user, v.id));
    },
  );

  return router;
}
