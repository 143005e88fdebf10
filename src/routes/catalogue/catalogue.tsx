import { useSearchParams } from "react-router-dom";
import type { PlatformKind } from "@shared/schemas/platforms";
import { getErrorMessage } from "@/lib/api-client";
import { useMe } from "@/lib/session";
import { paths } from "@/config/paths";
import { Alert } from "@/components/ui/alert";
import { ButtonLink } from "@/components/ui/button";
import { EmptyState } from "@/components/ui/empty-state";
import { Loading } from "@/components/ui/loading";
import { PageHeader } from "@/components/ui/page-header";
import { useCatalogue } from "@/features/catalogue/api/get-catalogue";
import { CatalogueSearch } from "@/features/catalogue/components/catalogue-search";
import { CatalogueTable } from "@/features/catalogue/components/catalogue-table";

export function Component() {
  const [params, setParams] = useSearchParams();
  const q = params.get("q") ?? "";
  const kindParam = params.get("kind");
  const kind = kindParam === "mooring" || kindParam === "drifter" ? (kindParam as PlatformKind) : undefined;
  const { data, isPending, error, isFetching } = useCatalogue({ q: q || undefined, kind });
  const { data: me } = useMe();
  const filtered = !!q || !!kind;

  return (
    <>
      <PageHeader
        title="Catalogue"
        description="Wind and ocean-current time series from moorings and drifting buoys, released after review by a second person. Each release is fixed, citable and free to download."
      />
      <div className="space-y-4">
        <CatalogueSearch
          q={q}
          kind={kind ?? ""}
          onChange={(next) => {
            const s = new URLSearchParams();
            if (next.q) s.set("q", next.q);
            if (next.kind) s.set("kind", next.kind);
            setParams(s, { replace: true });
          }}
        />
        <div aria-live="polite" className="min-h-6 text-sm text-muted">
          {data && !isPending ? `${data.items.length} released dataset${data.items.length === 1 ? "" : "s"}${filtered ? " match" : ""}` : null}
          {isFetching && !isPending ? " · updating…" : null}
        </div>
        {isPending ? (
          <Loading label="Loading the catalogue…" />
        ) : error ? (
          <Alert tone="attention" title="The catalogue could not be loaded">
            {getErrorMessage(error)}
          </Alert>
        ) : data.items.length === 0 ? (
          filtered ? (
            <EmptyState
              title="No released dataset matches"
              action={
                <ButtonLink to={paths.catalogue()} variant="secondary">
                  Clear the search
                </ButtonLink>
              }
            >
              Try fewer words, or a different platform type.
            </EmptyState>
          ) : (
            <EmptyState
              title="No released datasets yet"
              action={
                me ? (
                  <ButtonLink to={paths.projects()} variant="primary">
                    Go to my projects
                  </ButtonLink>
                ) : (
                  <ButtonLink to={paths.signIn()} variant="primary">
                    Sign in to contribute
                  </ButtonLink>
                )
              }
            >
              Datasets appear here once a curator has approved and released a version. Data managers create datasets in their project, upload
              logger files and submit a version for review.
            </EmptyState>
          )
        ) : (
          <CatalogueTable items={data.items} />
        )}
      </div>
    </>
  );
}
export { RouteError as ErrorBoundary } from "@/components/layout/route-error";
