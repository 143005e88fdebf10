import { queryOptions, useQuery, useQueryClient } from "@tanstack/react-query";
import type { Me } from "@shared/schemas/users";
import { ApiError, api } from "./api-client";
import { authClient } from "./auth-client";

// GET /api/me — null when signed out (the API answers 401).
export const meQueryOptions = () =>
  queryOptions({
    queryKey: ["me"],
    queryFn: async ({ signal }): Promise<Me | null> => {
      try {
        return await api.get<Me>("/api/me", signal);
      } catch (err) {
        if (err instanceof ApiError && err.status === 401) return null;
        throw err;
      }
    },
    staleTime: 60_000,
  });

export function useMe() {
  return useQuery(meQueryOptions());
}

export function useSignOut() {
  const qc = useQueryClient();
  return async () => {
    await authClient.signOut();
    qc.clear();
    await qc.invalidateQueries({ queryKey: ["me"] });
  };
}

/** Client-side role checks only hide controls; the server decides. */
export function isCuratorAnywhere(me: Me | null | undefined) {
  return !!me && (me.user.isAdmin || me.memberships.some((m) => m.role === "curator"));
}

export function roleIn(me: Me | null | undefined, projectId: string) {
  return me?.memberships.find((m) => m.projectId === projectId)?.role ?? null;
}

/** Contributors and curators of the project can create things in it; admins can too. */
export function canContribute(me: Me | null | undefined, projectId: string) {
  return !!me && (me.user.isAdmin || roleIn(me, projectId) !== null);
}
