import { useMutation, useQueryClient } from "@tanstack/react-query";
import { uploadWithProgress, type PickedFile } from "@/lib/upload-client";
import { uploadResult, type UploadOptions } from "@/schemas/curation";
import type { ResourceName } from "@/schemas/table-schema";
import { curationKeys, curationPaths } from "./curation-keys";

export interface UploadVariables {
  resource: ResourceName;
  file: PickedFile;
  options: UploadOptions;
  onProgress?: (fraction: number) => void;
}

export function useUploadMutation(versionId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: async ({ resource, file, options, onProgress }: UploadVariables) =>
      uploadResult.parse(
        await uploadWithProgress(
          curationPaths.upload(versionId, resource),
          { mapping: JSON.stringify(options.mapping), units: JSON.stringify(options.units), mode: options.mode, file },
          onProgress,
        ),
      ),
    onSettled: () => qc.invalidateQueries({ queryKey: curationKeys.version(versionId) }),
  });
}
