import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { Annotation, AnnotationResult, CreateAnnotationInput, UpdateAnnotationInput } from "@shared/schemas/annotations";
import { api } from "@/lib/api-client";

export const annotationKeys = { list: (datasetId: string) => ["annotations", datasetId] as const };

// GET /api/datasets/:id/annotations
export const useAnnotations = (datasetId: string, enabled = true) =>
  useQuery({
    queryKey: annotationKeys.list(datasetId),
    queryFn: ({ signal }) => api.get<{ items: Annotation[] }>(`/api/datasets/${datasetId}/annotations`, signal),
    enabled,
  });

/** Flags change records, plots and the report: refresh everything the explore page shows. */
function useInvalidate(datasetId: string) {
  const qc = useQueryClient();
  return () => Promise.all([qc.invalidateQueries({ queryKey: annotationKeys.list(datasetId) }), qc.invalidateQueries({ queryKey: ["explore"] })]);
}

// POST /api/datasets/:id/annotations
export function useCreateAnnotation(datasetId: string) {
  const invalidate = useInvalidate(datasetId);
  return useMutation({
    mutationFn: (input: CreateAnnotationInput) => api.post<AnnotationResult>(`/api/datasets/${datasetId}/annotations`, input),
    onSuccess: invalidate,
    meta: { handlesOwnErrors: true },
  });
}

// PATCH /api/annotations/:id
export function useUpdateAnnotation(datasetId: string) {
  const invalidate = useInvalidate(datasetId);
  return useMutation({
    mutationFn: ({ id, input }: { id: string; input: UpdateAnnotationInput }) => api.patch<AnnotationResult>(`/api/annotations/${id}`, input),
    onSuccess: invalidate,
    meta: { handlesOwnErrors: true },
  });
}

// DELETE /api/annotations/:id
export function useDeleteAnnotation(datasetId: string) {
  const invalidate = useInvalidate(datasetId);
  return useMutation({ mutationFn: (id: string) => api.delete<Pick<AnnotationResult, "applied" | "note">>(`/api/annotations/${id}`), onSuccess: invalidate });
}
