import { useMutation, useQueryClient } from "@tanstack/react-query";
import type { Deployment, UpdateDeploymentInput } from "@shared/schemas/platforms";
import { api } from "@/lib/api-client";

// PATCH /api/deployments/:id
export function useUpdateDeployment(platformId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, input }: { id: string; input: UpdateDeploymentInput }) => api.patch<Deployment>(`/api/deployments/${id}`, input),
    meta: { handlesOwnErrors: true },
    onSuccess: () => qc.invalidateQueries({ queryKey: ["platforms", platformId] }),
  });
}
