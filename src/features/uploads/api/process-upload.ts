import { useMutation, useQueryClient } from "@tanstack/react-query";
import type { CreatedVersion, CreateVersionInput } from "@shared/schemas/versions";
import { api } from "@/lib/api-client";

// POST /api/datasets/:id/versions (owned by the processing pipeline)
export const processUpload = (datasetId: string, input: CreateVersionInput) => api.post<CreatedVersion>(`/api/datasets/${datasetId}/versions`, input);

export function useProcessUpload(datasetId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateVersionInput) => processUpload(datasetId, input),
    meta: { handlesOwnErrors: true },
    onSuccess: () => qc.invalidateQueries({ queryKey: ["datasets", datasetId] }),
  });
}
