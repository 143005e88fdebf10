import { queryOptions, useQuery } from "@tanstack/react-query";
import type { AdminUser } from "@shared/schemas/users";
import { api } from "@/lib/api-client";

// GET /api/admin/users
export const adminUsersQueryOptions = () =>
  queryOptions({ queryKey: ["admin", "users"], queryFn: ({ signal }) => api.get<{ items: AdminUser[] }>("/api/admin/users", signal) });

export const useAdminUsers = () => useQuery(adminUsersQueryOptions());
