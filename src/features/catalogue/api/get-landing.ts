import { queryOptions, useQuery } from "@tanstack/react-query";
import type { DatasetLanding } from "@shared/schemas/catalogue";
import { api } from "@/lib/api-client";

// GET /api/v1/datasets/:id/landing
export const landingQueryOptions = (datasetId: string) =>
  queryOptions({
    queryKey: ["datasets", datasetId, "landing"],
    queryFn: ({ signal }) => api.get<DatasetLanding>(`/api/v1/datasets/${datasetId}/landing`, signal),
  });

export const useLanding = (datasetId: string) => useQuery(landingQueryOptions(datasetId));
