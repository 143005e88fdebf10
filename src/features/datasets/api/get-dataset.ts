import { queryOptions, useQuery } from "@tanstack/react-query";
import type { Dataset } from "@shared/schemas/datasets";
import { api } from "@/lib/api-client";

// GET /api/datasets/:id
export const datasetQueryOptions = (id: string) =>
  queryOptions({ queryKey: ["datasets", id], queryFn: ({ signal }) => api.get<Dataset>(`/api/datasets/${id}`, signal) });

/** An empty id (e.g. while the page that knows it still loads) asks nothing. */
export const useDataset = (id: string) => useQuery({ ...datasetQueryOptions(id), enabled: id !== "" });
