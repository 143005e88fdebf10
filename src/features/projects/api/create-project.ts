import { useMutation, useQueryClient } from "@tanstack/react-query";
import type { CreateProjectInput, Project } from "@shared/schemas/projects";
import { api } from "@/lib/api-client";

// POST /api/projects (admins)
export function useCreateProject() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateProjectInput) => api.post<Project>("/api/projects", input),
    meta: { handlesOwnErrors: true },
    onSuccess: () => qc.invalidateQueries({ queryKey: ["projects"] }),
  });
}
