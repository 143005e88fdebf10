import { useMutation, useQueryClient } from "@tanstack/react-query";
import type { Dataset, UpdateDatasetInput } from "@shared/schemas/datasets";
import { api } from "@/lib/api-client";

// PATCH /api/datasets/:id
export function useUpdateDataset(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: UpdateDatasetInput) => api.patch<Dataset>(`/api/datasets/${id}`, input),
    meta: { handlesOwnErrors: true },
    onSuccess: (d) => {
      qc.setQueryData(["datasets", id], d);
      return qc.invalidateQueries({ queryKey: ["projects", d.projectId] });
    },
  });
}
