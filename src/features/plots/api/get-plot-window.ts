import { keepPreviousData, queryOptions, useQuery } from "@tanstack/react-query";
import type { PlotWindow, Track } from "@shared/schemas/explore";
import type { VersionDetail } from "@shared/schemas/versions";
import { api } from "@/lib/api-client";

export const exploreKeys = {
  all: ["explore"] as const,
  version: (id: string) => ["explore", id] as const,
  plot: (id: string, variables: string[], from: string | null, to: string | null, buckets: number, platform: string | null) =>
    ["explore", id, "plot", variables.join(","), from, to, buckets, platform] as const,
  track: (id: string) => ["explore", id, "track"] as const,
};

// GET /api/versions/:id
export const exploreVersionQueryOptions = (id: string) =>
  queryOptions({ queryKey: exploreKeys.version(id), queryFn: ({ signal }) => api.get<VersionDetail>(`/api/versions/${id}`, signal) });
export const useExploreVersion = (id: string) => useQuery(exploreVersionQueryOptions(id));

// GET /api/versions/:id/plot
export function plotWindowQueryOptions(id: string, variables: string[], from: string | null, to: string | null, buckets: number, platform: string | null = null) {
  const q = new URLSearchParams({ variables: variables.join(","), buckets: String(buckets) });
  if (platform !== null) q.set("platform", platform);
  if (from) q.set("from", from);
  if (to) q.set("to", to);
  return queryOptions({
    queryKey: exploreKeys.plot(id, variables, from, to, buckets, platform),
    queryFn: ({ signal }) => api.get<PlotWindow>(`/api/versions/${id}/plot?${q}`, signal),
    enabled: variables.length > 0,
    placeholderData: keepPreviousData,
    staleTime: 60_000,
  });
}
export const usePlotWindow = (id: string, variables: string[], from: string | null, to: string | null, buckets: number, platform: string | null = null) =>
  useQuery(plotWindowQueryOptions(id, variables, from, to, buckets, platform));

// GET /api/versions/:id/track
export const useTrack = (id: string) =>
  useQuery({ queryKey: exploreKeys.track(id), queryFn: ({ signal }) => api.get<Track>(`/api/versions/${id}/track`, signal), staleTime: 60_000 });
