import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { Release, ReleaseInput } from "@shared/schemas/curation";
import { api } from "@/lib/api-client";

export const releaseKeys = {
  detail: (id: string) => ["releases", id] as const,
  ofDataset: (datasetId: string) => ["releases", "dataset", datasetId] as const,
  follow: (datasetId: string) => ["follow", datasetId] as const,
};

// GET /api/releases/:id
export const releaseQueryOptions = (id: string) =>
  queryOptions({ queryKey: releaseKeys.detail(id), queryFn: ({ signal }) => api.get<Release>(`/api/releases/${id}`, signal) });
export const useRelease = (id: string) => useQuery(releaseQueryOptions(id));

// GET /api/datasets/:id/releases
export const datasetReleasesQueryOptions = (datasetId: string) =>
  queryOptions({ queryKey: releaseKeys.ofDataset(datasetId), queryFn: ({ signal }) => api.get<{ items: Release[] }>(`/api/datasets/${datasetId}/releases`, signal) });
export const useDatasetReleases = (datasetId: string) => useQuery(datasetReleasesQueryOptions(datasetId));

function useInvalidateAfterRelease() {
  const qc = useQueryClient();
  return (r: Release) => {
    qc.setQueryData(releaseKeys.detail(r.id), r);
    void qc.invalidateQueries({ queryKey: ["review"] });
    void qc.invalidateQueries({ queryKey: releaseKeys.ofDataset(r.datasetId) });
    void qc.invalidateQueries({ queryKey: ["datasets", r.datasetId] });
    void qc.invalidateQueries({ queryKey: ["catalogue"] });
  };
}

// POST /api/versions/:id/release
export function useReleaseVersion(versionId: string) {
  const done = useInvalidateAfterRelease();
  return useMutation({
    mutationFn: (input: ReleaseInput) => api.post<Release>(`/api/versions/${versionId}/release`, input),
    meta: { handlesOwnErrors: true },
    onSuccess: done,
  });
}

// POST /api/versions/:id/retract
export function useRetractVersion(versionId: string) {
  const done = useInvalidateAfterRelease();
  return useMutation({
    mutationFn: (reason: string) => api.post<Release>(`/api/versions/${versionId}/retract`, { reason }),
    meta: { handlesOwnErrors: true },
    onSuccess: done,
  });
}

// GET/POST/DELETE /api/datasets/:id/follow
export const useFollowState = (datasetId: string, enabled: boolean) =>
  useQuery({ queryKey: releaseKeys.follow(datasetId), queryFn: ({ signal }) => api.get<{ following: boolean }>(`/api/datasets/${datasetId}/follow`, signal), enabled });

export function useSetFollow(datasetId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (follow: boolean) =>
      follow ? api.post<{ following: boolean }>(`/api/datasets/${datasetId}/follow`) : api.delete<{ following: boolean }>(`/api/datasets/${datasetId}/follow`),
    onSuccess: (s) => qc.setQueryData(releaseKeys.follow(datasetId), s),
  });
}
