import { queryOptions, useQuery } from "@tanstack/react-query";
import type { ArrayDiagnostics } from "@shared/schemas/versions";
import { api } from "@/lib/api-client";

// GET /api/projects/:id/array-diagnostics
export const arrayDiagnosticsQueryOptions = (projectId: string) =>
  queryOptions({
    queryKey: ["projects", projectId, "array-diagnostics"],
    queryFn: ({ signal }) => api.get<ArrayDiagnostics>(`/api/projects/${projectId}/array-diagnostics`, signal),
    staleTime: 60_000,
  });

export const useArrayDiagnostics = (projectId: string) => useQuery(arrayDiagnosticsQueryOptions(projectId));
