import { queryOptions, useQuery } from "@tanstack/react-query";
import type { Member } from "@shared/schemas/projects";
import { api } from "@/lib/api-client";

// GET /api/projects/:id/members
export const membersQueryOptions = (projectId: string) =>
  queryOptions({
    queryKey: ["projects", projectId, "members"],
    queryFn: ({ signal }) => api.get<{ items: Member[] }>(`/api/projects/${projectId}/members`, signal),
  });

export const useMembers = (projectId: string) => useQuery(membersQueryOptions(projectId));
