import { queryOptions, useQuery } from "@tanstack/react-query";
import type { Deployment } from "@shared/schemas/platforms";
import { api } from "@/lib/api-client";

// GET /api/platforms/:id/deployments
export const deploymentsQueryOptions = (platformId: string) =>
  queryOptions({
    queryKey: ["platforms", platformId, "deployments"],
    queryFn: ({ signal }) => api.get<{ items: Deployment[] }>(`/api/platforms/${platformId}/deployments`, signal),
  });

export const useDeployments = (platformId: string) => useQuery(deploymentsQueryOptions(platformId));
