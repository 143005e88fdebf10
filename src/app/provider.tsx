import { QueryClientProvider } from "@tanstack/react-query";
import { Component, type ErrorInfo, type ReactNode } from "react";
import { queryClient } from "@/lib/query-client";

/** Last line of defence: a whole-page crash shows a readable message instead of a blank page. */
class AppErrorBoundary extends Component<{ children: ReactNode }, { failed: boolean }> {
  state = { failed: false };
  static getDerivedStateFromError() {
    return { failed: true };
  }
  componentDidCatch(error: Error, info: ErrorInfo) {
    console.error("Tauline crashed", error, info.componentStack);
  }
  render() {
    if (!this.state.failed) return this.props.children;
    return (
      <div role="alert" className="mx-auto mt-16 max-w-lg rounded-lg border border-signal bg-surface p-6">
        <h1 className="text-2xl font-bold">Tauline stopped unexpectedly</h1>
        <p className="mt-2 text-muted">Reload the page to continue. If it happens again, tell an administrator what you were doing.</p>
        <button type="button" className="mt-4 rounded-md bg-accent px-3.5 py-2 font-semibold text-accent-fg" onClick={() => window.location.reload()}>
          Reload the page
        </button>
      </div>
    );
  }
}

export function AppProvider({ children }: { children: ReactNode }) {
  return (
    <AppErrorBoundary>
      <QueryClientProvider client={queryClient}>{children}</QueryClientProvider>
    </AppErrorBoundary>
  );
}
