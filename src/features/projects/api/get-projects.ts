import { queryOptions, useQuery } from "@tanstack/react-query";
import type { Project } from "@shared/schemas/projects";
import { api } from "@/lib/api-client";

// GET /api/projects
export const projectsQueryOptions = () =>
  queryOptions({ queryKey: ["projects"], queryFn: ({ signal }) => api.get<{ items: Project[] }>("/api/projects", signal) });

export const useProjects = () => useQuery(projectsQueryOptions());
