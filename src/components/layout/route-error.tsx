import { isRouteErrorResponse, Link, useRouteError } from "react-router-dom";
import { ApiError, getErrorMessage } from "@/lib/api-client";
import { paths } from "@/config/paths";
import { useDocumentTitle } from "@/lib/use-document-title";
import { buttonClass } from "@/components/ui/button";

function describe(error: unknown): { status?: number; title: string; text: string } {
  const status = error instanceof ApiError ? error.status : isRouteErrorResponse(error) ? error.status : undefined;
  if (status === 401) return { status, title: "Please sign in", text: "This page is for signed-in members. Sign in and you will come back here." };
  if (status === 403)
    return { status, title: "No access to this page", text: "You are not a member of the project this belongs to. Ask one of its curators or an administrator to add you." };
  if (status === 404) return { status, title: "Not found", text: "We could not find this. It may have been removed, or the link may be mistyped." };
  if (error instanceof ApiError && error.status === 0) return { title: "Server unreachable", text: getErrorMessage(error) };
  if (error instanceof Error && /dynamically imported module|Failed to fetch/i.test(error.message)) {
    return { title: "Tauline was updated", text: "A newer version of this page is available. Reload the page to continue." };
  }
  return { status, title: "This page could not be shown", text: getErrorMessage(error) };
}

/** Error boundary for a route: a short status-specific message and a way back. */
export function RouteError() {
  const error = useRouteError();
  const d = describe(error);
  useDocumentTitle(d.title);
  return (
    <div role="alert" className="mx-auto max-w-xl rounded-lg border border-signal bg-surface p-6">
      <p className="num text-sm text-signal">{d.status ? `Error ${d.status}` : "Error"}</p>
      <h1 className="mt-1 text-2xl font-bold">{d.title}</h1>
      <p className="mt-2 text-muted">{d.text}</p>
      <div className="mt-4 flex flex-wrap gap-2">
        {d.status === 401 ? (
          <Link className={buttonClass("primary")} to={paths.signIn(window.location.pathname)}>
            Sign in
          </Link>
        ) : null}
        <Link className={buttonClass("secondary")} to={paths.home()}>
          Go to the catalogue
        </Link>
        <button type="button" className={buttonClass("ghost")} onClick={() => window.location.reload()}>
          Reload the page
        </button>
      </div>
    </div>
  );
}
