import { useMutation, useQueryClient } from "@tanstack/react-query";
import type { AdminUser } from "@shared/schemas/users";
import { api } from "@/lib/api-client";
import { showToast } from "@/lib/toast";

// PATCH /api/admin/users/:id { isAdmin }
export function useSetAdmin() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, isAdmin }: { id: string; isAdmin: boolean }) => api.patch<AdminUser>(`/api/admin/users/${encodeURIComponent(id)}`, { isAdmin }),
    onSuccess: (_u, v) => {
      showToast(v.isAdmin ? "Administrator rights granted." : "Administrator rights removed.", "success");
      return Promise.all([qc.invalidateQueries({ queryKey: ["admin", "users"] }), qc.invalidateQueries({ queryKey: ["me"] })]);
    },
  });
}
