import { queryOptions, useQuery } from "@tanstack/react-query";
import type { VersionComparison, VersionReview } from "@shared/schemas/curation";
import { api } from "@/lib/api-client";

export const reviewKeys = {
  all: ["review"] as const,
  version: (id: string) => ["review", "version", id] as const,
  comparison: (id: string) => ["review", "comparison", id] as const,
  comments: (id: string) => ["review", "comments", id] as const,
  queue: () => ["review-queue"] as const,
};

// GET /api/versions/:id/review
export const versionReviewQueryOptions = (id: string) =>
  queryOptions({ queryKey: reviewKeys.version(id), queryFn: ({ signal }) => api.get<VersionReview>(`/api/versions/${id}/review`, signal) });

export const useVersionReview = (id: string) => useQuery(versionReviewQueryOptions(id));

// GET /api/versions/:id/compare
export const versionComparisonQueryOptions = (id: string) =>
  queryOptions({ queryKey: reviewKeys.comparison(id), queryFn: ({ signal }) => api.get<VersionComparison>(`/api/versions/${id}/compare`, signal), staleTime: 5 * 60_000 });

export const useVersionComparison = (id: string) => useQuery(versionComparisonQueryOptions(id));
