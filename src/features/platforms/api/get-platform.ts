import { queryOptions, useQuery } from "@tanstack/react-query";
import type { Platform } from "@shared/schemas/platforms";
import { api } from "@/lib/api-client";

// GET /api/platforms/:id
export const platformQueryOptions = (id: string) =>
  queryOptions({ queryKey: ["platforms", id], queryFn: ({ signal }) => api.get<Platform>(`/api/platforms/${id}`, signal) });

export const usePlatform = (id: string) => useQuery(platformQueryOptions(id));
