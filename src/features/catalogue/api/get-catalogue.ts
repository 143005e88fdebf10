import { keepPreviousData, queryOptions, useQuery } from "@tanstack/react-query";
import type { CatalogueEntry } from "@shared/schemas/datasets";
import type { PlatformKind } from "@shared/schemas/platforms";
import { api, withQuery } from "@/lib/api-client";

export type CatalogueFilter = { q?: string; kind?: PlatformKind };

// GET /api/catalogue?q=&kind=
export const catalogueQueryOptions = (f: CatalogueFilter) =>
  queryOptions({
    queryKey: ["catalogue", f],
    queryFn: ({ signal }) => api.get<{ items: CatalogueEntry[] }>(withQuery("/api/catalogue", { q: f.q, kind: f.kind }), signal),
    placeholderData: keepPreviousData,
  });

export const useCatalogue = (f: CatalogueFilter) => useQuery(catalogueQueryOptions(f));
