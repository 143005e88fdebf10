import { useMutation, useQueryClient } from "@tanstack/react-query";
import type { Platform, UpdatePlatformInput } from "@shared/schemas/platforms";
import { api } from "@/lib/api-client";

// PATCH /api/platforms/:id
export function useUpdatePlatform(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: UpdatePlatformInput) => api.patch<Platform>(`/api/platforms/${id}`, input),
    meta: { handlesOwnErrors: true },
    onSuccess: (p) => {
      qc.setQueryData(["platforms", id], p);
      return qc.invalidateQueries({ queryKey: ["projects", p.projectId] });
    },
  });
}
