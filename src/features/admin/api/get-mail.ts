import { queryOptions, useQuery } from "@tanstack/react-query";
import type { MailMessage } from "@shared/schemas/users";
import { api } from "@/lib/api-client";

// GET /api/admin/mail — the outgoing-mail box of the local mail catcher
export const mailQueryOptions = () =>
  queryOptions({
    queryKey: ["admin", "mail"],
    queryFn: ({ signal }) => api.get<{ items: MailMessage[] }>("/api/admin/mail", signal),
    refetchInterval: 15_000,
  });

export const useMail = () => useQuery(mailQueryOptions());
