import { queryOptions, useQuery } from "@tanstack/react-query";
import { api } from "@/lib/api-client";

export type ReviewQueueItem = {
  versionId: string;
  datasetId: string;
  datasetTitle: string;
  projectName: string;
  number: number;
  submittedAt: string;
  submittedBy: string | null;
};

// GET /api/review-queue (curators)
export const reviewQueueQueryOptions = () =>
  queryOptions({ queryKey: ["review-queue"], queryFn: ({ signal }) => api.get<{ items: ReviewQueueItem[] }>("/api/review-queue", signal) });

export const useReviewQueue = () => useQuery(reviewQueueQueryOptions());
