import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { MarkReadInput, NotificationList } from "@shared/schemas/curation";
import { api } from "@/lib/api-client";

const key = ["notifications"] as const;

// GET /api/notifications — polled so the unread count stays current without a reload.
export const notificationsQueryOptions = () =>
  queryOptions({
    queryKey: key,
    queryFn: ({ signal }) => api.get<NotificationList>("/api/notifications", signal),
    refetchInterval: 30_000,
    staleTime: 10_000,
  });

export const useNotifications = (enabled: boolean) => useQuery({ ...notificationsQueryOptions(), enabled });

// POST /api/notifications/read
export function useMarkRead() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: MarkReadInput) => api.post<NotificationList>("/api/notifications/read", input),
    onSuccess: (list) => qc.setQueryData(key, list),
  });
}
