import { Router } from "express";
import { z } from "zod";
import { curationDataset, curationDatasetList, datasetCreate, datasetPatch, editorParams, editorsBody, versionCreate, versionDetail } from "@/schemas/curation";
import type { AppContext } from "@/server/context";
import { currentUser, requireRole, requireUser, requireWriteScope } from "@/server/auth/guards";
import { notFound } from "@/server/errors";
import { problemResponses } from "@/server/openapi/registry";
import { canEditDataset, datasetBySlug, isReviewer } from "@/server/services/curation/access";
import { addEditor, createDataset, datasetDetail, listCurationDatasets, patchDataset, removeEditor } from "@/server/services/curation/datasets";
import { createVersion, versionDetail as describeVersion } from "@/server/services/curation/versions";
import { parseBody, parseParams } from "@/server/validate";
import { json, security } from "./docs";

const slugParams = z.object({ slug: z.string().min(1).max(120) });

export function curationDatasetRoutes(ctx: AppContext): Router {
  const { db, registry } = ctx;
  const router = Router();

  registry.registerPath({
    method: "post", path: "/api/v1/datasets", tags: ["Curation"], summary: "Create a dataset (curator)", security,
    request: { body: { content: { "application/json": { schema: datasetCreate } } } },
    responses: { 201: json(curationDataset, "The new dataset, without versions yet"), ...problemResponses(400, 401, 403, 409) },
  });
  router.post("/datasets", requireWriteScope, requireRole("curator"), async (req, res) => {
    const body = parseBody(datasetCreate, req);
    res.status(201).json(await createDataset(db, currentUser(req), body));
  });

  registry.registerPath({
    method: "patch", path: "/api/v1/datasets/{slug}", tags: ["Curation"], summary: "Edit a dataset's metadata (owner, editors, admin)", security,
    request: { params: slugParams, body: { content: { "application/json": { schema: datasetPatch } } } },
    responses: { 200: json(curationDataset, "The dataset"), ...problemResponses(400, 401, 403, 404) },
  });
  router.patch("/datasets/:slug", requireWriteScope, async (req, res) => {
    const { slug } = parseParams(slugParams, req);
    const body = parseBody(datasetPatch, req);
    res.json(await patchDataset(db, currentUser(req), await datasetBySlug(db, slug), body));
  });

  registry.registerPath({
    method: "get", path: "/api/v1/curation/datasets", tags: ["Curation"], summary: "Datasets I work on, drafts included (all for reviewers and admins)", security,
    responses: { 200: json(curationDatasetList, "Datasets with all their versions"), ...problemResponses(401, 403) },
  });
  router.get("/curation/datasets", requireRole("curator", "reviewer"), async (req, res) => {
    res.json({ items: await listCurationDatasets(db, currentUser(req)) });
  });

  registry.registerPath({
    method: "get", path: "/api/v1/curation/datasets/{slug}", tags: ["Curation"], summary: "One dataset with every version (editors and reviewers)", security,
    request: { params: slugParams },
    responses: { 200: json(curationDataset, "The dataset"), ...problemResponses(401, 404) },
  });
  router.get("/curation/datasets/:slug", requireUser, async (req, res) => {
    const { slug } = parseParams(slugParams, req);
    const dataset = await datasetBySlug(db, slug);
    const user = currentUser(req);
    if (!isReviewer(user) && !(await canEditDataset(db, user, dataset))) throw notFound(`No dataset is called "${slug}".`);
    res.json(await datasetDetail(db, user, dataset));
  });

  registry.registerPath({
    method: "post", path: "/api/v1/curation/datasets/{slug}/editors", tags: ["Curation"], summary: "Share a dataset with another curator (owner, admin)", security,
    request: { params: slugParams, body: { content: { "application/json": { schema: editorsBody } } } },
    responses: { 200: json(curationDataset, "The dataset with its editors"), ...problemResponses(400, 401, 403, 404, 409) },
  });
  router.post("/curation/datasets/:slug/editors", requireWriteScope, requireRole("curator"), async (req, res) => {
    const { slug } = parseParams(slugParams, req);
    const { email } = parseBody(editorsBody, req);
    res.json(await addEditor(db, currentUser(req), await datasetBySlug(db, slug), email));
  });

  registry.registerPath({
    method: "delete", path: "/api/v1/curation/datasets/{slug}/editors/{userId}", tags: ["Curation"], summary: "Stop sharing a dataset with an editor (owner, admin)", security,
    request: { params: editorParams },
    responses: { 200: json(curationDataset, "The dataset with its remaining editors"), ...problemResponses(401, 403, 404) },
  });
  router.delete("/curation/datasets/:slug/editors/:userId", requireWriteScope, requireRole("curator"), async (req, res) => {
    const { slug, userId } = parseParams(editorParams, req);
    res.json(await removeEditor(db, currentUser(req), await datasetBySlug(db, slug), userId));
  });

  registry.registerPath({
    method: "post", path: "/api/v1/datasets/{slug}/versions", tags: ["Curation"],
    summary: "Start a new draft version: a copy of the latest published version, or empty for the first", security,
    request: { params: slugParams, body: { content: { "application/json": { schema: versionCreate } } } },
    responses: { 201: json(versionDetail, "The new draft"), ...problemResponses(400, 401, 403, 404, 409) },
  });
  router.post("/datasets/:slug/versions", requireWriteScope, requireRole("curator"), async (req, res) => {
    const { slug } = parseParams(slugParams, req);
    const body = parseBody(versionCreate, req);
    const user = currentUser(req);
    const v = await createVersion(ctx, user, await datasetBySlug(db, slug), body.semver);
    res.status(201).location(`/api/v1/curation/versions/${v.id}`).json(await describeVersion(ctx, user, v.id));
  });

  return router;
}
