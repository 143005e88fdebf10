import { useMutation, useQueryClient } from "@tanstack/react-query";
import type { AddMemberInput, Member } from "@shared/schemas/projects";
import { api } from "@/lib/api-client";

// POST /api/projects/:id/members (admins)
export function useAddMember(projectId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: AddMemberInput) => api.post<Member>(`/api/projects/${projectId}/members`, input),
    meta: { handlesOwnErrors: true },
    onSuccess: () => qc.invalidateQueries({ queryKey: ["projects", projectId] }),
  });
}
