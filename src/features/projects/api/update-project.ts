import { useMutation, useQueryClient } from "@tanstack/react-query";
import type { Project, UpdateProjectInput } from "@shared/schemas/projects";
import { api } from "@/lib/api-client";

// PATCH /api/projects/:id (curators of the project, admins)
export function useUpdateProject(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: UpdateProjectInput) => api.patch<Project>(`/api/projects/${id}`, input),
    meta: { handlesOwnErrors: true },
    onSuccess: (p) => {
      qc.setQueryData(["projects", id], (old: Project | undefined) => ({ ...old, ...p }));
      return qc.invalidateQueries({ queryKey: ["projects"] });
    },
  });
}
