import { queryOptions, useQuery } from "@tanstack/react-query";
import type { Dataset } from "@shared/schemas/datasets";
import { api } from "@/lib/api-client";

// GET /api/projects/:id/datasets
export const datasetsQueryOptions = (projectId: string) =>
  queryOptions({
    queryKey: ["projects", projectId, "datasets"],
    queryFn: ({ signal }) => api.get<{ items: Dataset[] }>(`/api/projects/${projectId}/datasets`, signal),
  });

export const useDatasets = (projectId: string) => useQuery(datasetsQueryOptions(projectId));
