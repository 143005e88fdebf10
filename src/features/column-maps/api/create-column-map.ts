import { useMutation, useQueryClient } from "@tanstack/react-query";
import type { ColumnMapRevision, CreateColumnMapInput } from "@shared/schemas/uploads";
import { api } from "@/lib/api-client";
import { columnMapKeys } from "./get-column-maps";

// POST /api/platforms/:id/column-maps
export const createColumnMap = (platformId: string, input: CreateColumnMapInput) => api.post<ColumnMapRevision>(`/api/platforms/${platformId}/column-maps`, input);

export function useCreateColumnMap(platformId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateColumnMapInput) => createColumnMap(platformId, input),
    meta: { handlesOwnErrors: true },
    onSuccess: () => qc.invalidateQueries({ queryKey: columnMapKeys.platform(platformId) }),
  });
}
