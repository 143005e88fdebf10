import { queryOptions, useQuery } from "@tanstack/react-query";
import type { Platform } from "@shared/schemas/platforms";
import { api } from "@/lib/api-client";

// GET /api/projects/:id/platforms
export const platformsQueryOptions = (projectId: string) =>
  queryOptions({
    queryKey: ["projects", projectId, "platforms"],
    queryFn: ({ signal }) => api.get<{ items: Platform[] }>(`/api/projects/${projectId}/platforms`, signal),
  });

export const usePlatforms = (projectId: string) => useQuery(platformsQueryOptions(projectId));
