import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { ApiToken, CreateApiTokenInput, CreatedApiToken } from "@shared/schemas/tokens";
import { api } from "@/lib/api-client";

// GET /api/v1/tokens
export const useTokens = (enabled: boolean) =>
  useQuery({ queryKey: ["tokens"], queryFn: ({ signal }) => api.get<{ items: ApiToken[] }>("/api/v1/tokens", signal), enabled });

// POST /api/v1/tokens
export function useCreateToken() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateApiTokenInput) => api.post<CreatedApiToken>("/api/v1/tokens", input),
    onSuccess: () => qc.invalidateQueries({ queryKey: ["tokens"] }),
  });
}

// DELETE /api/v1/tokens/:id
export function useRevokeToken() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => api.delete<ApiToken>(`/api/v1/tokens/${id}`),
    onSuccess: () => qc.invalidateQueries({ queryKey: ["tokens"] }),
  });
}
