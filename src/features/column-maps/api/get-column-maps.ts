import { queryOptions, useQuery } from "@tanstack/react-query";
import type { ColumnMapRevision } from "@shared/schemas/uploads";
import { api } from "@/lib/api-client";

export const columnMapKeys = { platform: (platformId: string) => ["column-maps", platformId] as const };

// GET /api/platforms/:id/column-maps
export const columnMapsQueryOptions = (platformId: string) =>
  queryOptions({
    queryKey: columnMapKeys.platform(platformId),
    queryFn: ({ signal }) => api.get<{ items: ColumnMapRevision[] }>(`/api/platforms/${platformId}/column-maps`, signal).then((r) => r.items),
  });

export const useColumnMaps = (platformId: string | null) => useQuery({ ...columnMapsQueryOptions(platformId ?? ""), enabled: !!platformId });
