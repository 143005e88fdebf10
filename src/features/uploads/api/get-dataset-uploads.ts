import { queryOptions, useQuery } from "@tanstack/react-query";
import type { DatasetUploads } from "@shared/schemas/uploads";
import { api } from "@/lib/api-client";

export const uploadKeys = {
  all: ["uploads"] as const,
  dataset: (datasetId: string) => ["uploads", "dataset", datasetId] as const,
  detail: (id: string, dialect: Record<string, string | number | undefined>) => ["uploads", "detail", id, dialect] as const,
};

// GET /api/datasets/:id/uploads
export const datasetUploadsQueryOptions = (datasetId: string) =>
  queryOptions({
    queryKey: uploadKeys.dataset(datasetId),
    queryFn: ({ signal }) => api.get<DatasetUploads>(`/api/datasets/${datasetId}/uploads`, signal),
    // Keep polling while the server is still scanning a file.
    refetchInterval: (q) => (q.state.data?.items.some((u) => u.status === "checking") ? 2000 : false),
  });

export const useDatasetUploads = (datasetId: string) => useQuery(datasetUploadsQueryOptions(datasetId));
