import { keepPreviousData, queryOptions, useQuery } from "@tanstack/react-query";
import type { PreviewQuery, UploadDetail } from "@shared/schemas/uploads";
import { api, withQuery } from "@/lib/api-client";
import { uploadKeys } from "./get-dataset-uploads";

// GET /api/uploads/:id
export const uploadQueryOptions = (id: string, dialect: PreviewQuery = {}) =>
  queryOptions({
    queryKey: uploadKeys.detail(id, dialect),
    queryFn: ({ signal }) =>
      api.get<UploadDetail>(
        withQuery(`/api/uploads/${id}`, {
          delimiter: dialect.delimiter,
          decimalMark: dialect.decimalMark,
          headerRow: dialect.headerRow === undefined ? undefined : String(dialect.headerRow),
          skipRows: dialect.skipRows === undefined ? undefined : String(dialect.skipRows),
        }),
        signal,
      ),
    placeholderData: keepPreviousData,
    refetchInterval: (q) => (q.state.data?.status === "checking" ? 2000 : false),
  });

export const useUpload = (id: string, dialect: PreviewQuery = {}) => useQuery(uploadQueryOptions(id, dialect));
