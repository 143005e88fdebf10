import { useMutation, useQueryClient } from "@tanstack/react-query";
import { api } from "@/lib/api-client";
import { showToast } from "@/lib/toast";

// DELETE /api/projects/:id/members/:userId (admins)
export function useRemoveMember(projectId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (userId: string) => api.delete(`/api/projects/${projectId}/members/${encodeURIComponent(userId)}`),
    onSuccess: () => {
      showToast("Member removed from the project.", "success");
      return qc.invalidateQueries({ queryKey: ["projects", projectId] });
    },
  });
}
