import { useMutation, useQueryClient } from "@tanstack/react-query";
import type { VersionReview } from "@shared/schemas/curation";
import { api } from "@/lib/api-client";
import { reviewKeys } from "./get-version-review";

export type ReviewAction = "submit" | "approve" | "reject" | "request-changes";

// POST /api/versions/:id/{submit,approve,reject,request-changes}
export function useVersionAction(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ action, reason, note }: { action: ReviewAction; reason?: string; note?: string }) =>
      api.post<VersionReview>(`/api/versions/${id}/${action}`, action === "submit" ? { note: note || undefined } : { reason: reason || undefined }),
    meta: { handlesOwnErrors: true },
    onSuccess: (review) => {
      qc.setQueryData(reviewKeys.version(id), review);
      void qc.invalidateQueries({ queryKey: reviewKeys.comments(id) });
      void qc.invalidateQueries({ queryKey: reviewKeys.queue() });
      void qc.invalidateQueries({ queryKey: ["datasets", review.version.datasetId] });
      void qc.invalidateQueries({ queryKey: ["notifications"] });
    },
  });
}
