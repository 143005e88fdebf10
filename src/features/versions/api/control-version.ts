import { useMutation, useQueryClient } from "@tanstack/react-query";
import type { VersionProgress } from "@shared/schemas/versions";
import { api } from "@/lib/api-client";
import { versionKeys } from "./get-version";

// POST /api/versions/:id/cancel and POST /api/versions/:id/retry
export function useControlVersion(id: string, action: "cancel" | "retry") {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => api.post<VersionProgress>(`/api/versions/${id}/${action}`, {}),
    onSettled: () => qc.invalidateQueries({ queryKey: versionKeys.detail(id) }),
  });
}
