import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { Comment } from "@shared/schemas/curation";
import { api } from "@/lib/api-client";
import { reviewKeys } from "./get-version-review";

// GET /api/versions/:id/comments
export const commentsQueryOptions = (versionId: string) =>
  queryOptions({ queryKey: reviewKeys.comments(versionId), queryFn: ({ signal }) => api.get<{ items: Comment[] }>(`/api/versions/${versionId}/comments`, signal) });

export const useComments = (versionId: string) => useQuery(commentsQueryOptions(versionId));

// POST /api/versions/:id/comments
export function useAddComment(versionId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: string) => api.post<Comment>(`/api/versions/${versionId}/comments`, { body }),
    meta: { handlesOwnErrors: true },
    onSuccess: () => qc.invalidateQueries({ queryKey: reviewKeys.comments(versionId) }),
  });
}
