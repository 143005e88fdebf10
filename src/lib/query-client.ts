import { MutationCache, QueryClient } from "@tanstack/react-query";
import { paths } from "@/config/paths";
import { ApiError, getErrorMessage } from "./api-client";
import { showToast } from "./toast";

declare module "@tanstack/react-query" {
  interface Register {
    mutationMeta: { handlesOwnErrors?: boolean };
  }
}

export const queryClient = new QueryClient({
  defaultOptions: {
    queries: {
      staleTime: 30_000,
      refetchOnWindowFocus: false,
      retry: (count, error) => !(error instanceof ApiError && error.status >= 400 && error.status < 500) && count < 2,
    },
  },
  mutationCache: new MutationCache({
    onError: (error, _vars, _ctx, mutation) => {
      if (error instanceof ApiError && error.status === 401) {
        const here = window.location.pathname + window.location.search;
        window.location.assign(paths.signIn(here));
        return;
      }
      if (mutation.meta?.handlesOwnErrors) return;
      showToast(getErrorMessage(error), "error");
    },
  }),
});
