import type { Db } from "@/db/client";
import type { MetaAnalysisResponse } from "@/schemas/analysis";
import type { DraftPreviewQuery } from "@/schemas/review";
import { runMetaAnalysis } from "@/server/services/analysis/run-meta-analysis";
import { assertEditorOrReviewer, versionById, type User } from "./access";

/**
 * The Evidence screen's meta-analysis run on one version's own responses, whatever its state: what the public will
 * read once it is published. Only the dataset's editors and reviewers may ask; to anyone else the version does not
 * exist (404).
 */
export async function draftPreview(
  db: Db,
  user: User | undefined,
  versionId: string,
  query: DraftPreviewQuery,
): Promise<MetaAnalysisResponse> {
  const { version, dataset } = await versionById(db, versionId);
  await assertEditorOrReviewer(db, user, dataset);
  const only = [
    {
      versionId: version.id,
      datasetId: dataset.id,
      datasetSlug: dataset.slug,
      datasetTitle: dataset.title,
      semver: version.semver,
      licence: dataset.licence,
      state: version.state,
    },
  ];
  return runMetaAnalysis(db, { ...query, format: "json" }, async () => only);
}
