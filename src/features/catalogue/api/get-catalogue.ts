import { keepPreviousData, queryOptions, useQuery } from "@tanstack/react-query";
import type { CataloguePage, CatalogueSort } from "@shared/schemas/catalogue";
import type { PlatformKind } from "@shared/schemas/platforms";
import { api, withQuery } from "@/lib/api-client";

/** The catalogue's filters as they appear in the page URL and the API query (same names). */
export type CatalogueFilter = {
  q?: string;
  kind?: PlatformKind;
  bbox?: string;
  from?: string;
  to?: string;
  variables?: string;
  sort?: CatalogueSort;
  page?: number;
};

export const filterKeys = ["q", "kind", "bbox", "from", "to", "variables", "sort", "page"] as const;

/** Reads the filters from URL search params (unknown values are left for the server to explain). */
export function filterFromParams(p: URLSearchParams): CatalogueFilter {
  const f: Record<string, string> = {};
  for (const k of filterKeys) {
    const v = p.get(k);
    if (v) f[k] = v;
  }
  return { ...(f as Omit<CatalogueFilter, "page">), page: f.page ? Number(f.page) || 1 : undefined } as CatalogueFilter;
}

export function filterToParams(f: CatalogueFilter): URLSearchParams {
  const s = new URLSearchParams();
  for (const k of filterKeys) {
    const v = f[k];
    if (v !== undefined && v !== "" && !(k === "page" && v === 1) && !(k === "sort" && v === "released")) s.set(k, String(v));
  }
  return s;
}

// GET /api/v1/catalogue
export const catalogueQueryOptions = (f: CatalogueFilter) =>
  queryOptions({
    queryKey: ["catalogue", f],
    queryFn: ({ signal }) =>
      api.get<CataloguePage>(withQuery("/api/v1/catalogue", { ...Object.fromEntries(filterToParams(f)), pageSize: "25" }), signal),
    placeholderData: keepPreviousData,
  });

export const useCatalogue = (f: CatalogueFilter) => useQuery(catalogueQueryOptions(f));
