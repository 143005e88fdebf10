import { useInfiniteQuery } from "@tanstack/react-query";
import type { RecordsPage } from "@shared/schemas/explore";
import { api } from "@/lib/api-client";

export interface RecordsFilter {
  variables: string[];
  from?: string;
  to?: string;
  order: "asc" | "desc";
  flags: number[];
  /** A variable to sort by (in `order`) instead of time. */
  sort?: string;
}

// GET /api/versions/:id/records (keyset pages, fetched as the table scrolls)
export function useRecordPages(versionId: string, f: RecordsFilter) {
  return useInfiniteQuery({
    queryKey: ["explore", versionId, "records", f],
    initialPageParam: null as string | null,
    queryFn: ({ pageParam, signal }) => {
      const q = new URLSearchParams({ order: f.order, limit: "500" });
      if (f.variables.length) q.set("variables", f.variables.join(","));
      if (f.from) q.set("from", f.from);
      if (f.to) q.set("to", f.to);
      if (f.flags.length) q.set("flags", f.flags.join(","));
      if (f.sort) q.set("sort", f.sort);
      if (pageParam) q.set("cursor", pageParam);
      return api.get<RecordsPage>(`/api/versions/${versionId}/records?${q}`, signal);
    },
    getNextPageParam: (last) => last.nextCursor,
  });
}
