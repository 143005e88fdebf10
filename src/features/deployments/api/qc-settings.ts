import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { DeploymentQcSettings } from "@shared/schemas/qc-settings";
import { api } from "@/lib/api-client";

// GET /api/deployments/:id/qc-settings
export const deploymentQcSettingsQueryOptions = (deploymentId: string) =>
  queryOptions({
    queryKey: ["deployments", deploymentId, "qc-settings"],
    queryFn: ({ signal }) => api.get<DeploymentQcSettings>(`/api/deployments/${deploymentId}/qc-settings`, signal),
  });

export const useDeploymentQcSettings = (deploymentId: string) => useQuery(deploymentQcSettingsQueryOptions(deploymentId));

// PATCH /api/deployments/:id/qc-settings — replaces the overrides ({} = defaults)
export function useUpdateDeploymentQcSettings(deploymentId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (overrides: Record<string, unknown>) => api.patch<DeploymentQcSettings>(`/api/deployments/${deploymentId}/qc-settings`, { overrides }),
    meta: { handlesOwnErrors: true },
    onSuccess: (data) => qc.setQueryData(deploymentQcSettingsQueryOptions(deploymentId).queryKey, data),
  });
}
