import { useMutation, useQueryClient } from "@tanstack/react-query";
import type { CreateDatasetInput, Dataset } from "@shared/schemas/datasets";
import { api } from "@/lib/api-client";

// POST /api/projects/:id/datasets
export function useCreateDataset(projectId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateDatasetInput) => api.post<Dataset>(`/api/projects/${projectId}/datasets`, input),
    meta: { handlesOwnErrors: true },
    onSuccess: () => qc.invalidateQueries({ queryKey: ["projects", projectId] }),
  });
}
