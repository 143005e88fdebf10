import { useMutation, useQueryClient } from "@tanstack/react-query";
import type { CreatePlatformInput, Platform } from "@shared/schemas/platforms";
import { api } from "@/lib/api-client";

// POST /api/projects/:id/platforms (contributors and curators of the project)
export function useCreatePlatform(projectId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: CreatePlatformInput) => api.post<Platform>(`/api/projects/${projectId}/platforms`, input),
    meta: { handlesOwnErrors: true },
    onSuccess: () => qc.invalidateQueries({ queryKey: ["projects", projectId] }),
  });
}
