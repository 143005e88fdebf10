import { queryOptions, useQuery } from "@tanstack/react-query";
import type { Project } from "@shared/schemas/projects";
import { api } from "@/lib/api-client";

// GET /api/projects/:id
export const projectQueryOptions = (id: string) =>
  queryOptions({ queryKey: ["projects", id], queryFn: ({ signal }) => api.get<Project>(`/api/projects/${id}`, signal) });

export const useProject = (id: string) => useQuery({ ...projectQueryOptions(id), enabled: id !== "" });
