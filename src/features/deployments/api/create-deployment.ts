import { useMutation, useQueryClient } from "@tanstack/react-query";
import type { CreateDeploymentInput, Deployment } from "@shared/schemas/platforms";
import { api } from "@/lib/api-client";

// POST /api/platforms/:id/deployments
export function useCreateDeployment(platformId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateDeploymentInput) => api.post<Deployment>(`/api/platforms/${platformId}/deployments`, input),
    meta: { handlesOwnErrors: true },
    onSuccess: () => qc.invalidateQueries({ queryKey: ["platforms", platformId] }),
  });
}
