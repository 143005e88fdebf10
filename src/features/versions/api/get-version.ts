import { queryOptions, useQuery } from "@tanstack/react-query";
import type { VersionDetail } from "@shared/schemas/versions";
import { api } from "@/lib/api-client";

export const versionKeys = {
  all: ["versions"] as const,
  detail: (id: string) => ["versions", id] as const,
};

// GET /api/versions/:id — polled every second while the version is processing (progress, rows/s, stage).
export const versionQueryOptions = (id: string) =>
  queryOptions({
    queryKey: versionKeys.detail(id),
    queryFn: ({ signal }) => api.get<VersionDetail>(`/api/versions/${id}`, signal),
    refetchInterval: (q) => (q.state.data?.state === "processing" ? 1000 : false),
  });

export const useVersion = (id: string) => useQuery(versionQueryOptions(id));
