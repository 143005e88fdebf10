import { useSearchParams } from "react-router-dom";
import { ApiError, getErrorMessage } from "@/lib/api-client";
import { useMe } from "@/lib/session";
import { paths } from "@/config/paths";
import { Alert } from "@/components/ui/alert";
import { Button, ButtonLink } from "@/components/ui/button";
import { EmptyState } from "@/components/ui/empty-state";
import { Loading } from "@/components/ui/loading";
import { PageHeader } from "@/components/ui/page-header";
import { filterFromParams, filterToParams, useCatalogue, type CatalogueFilter } from "@/features/catalogue/api/get-catalogue";
import { CatalogueSearch } from "@/features/catalogue/components/catalogue-search";
import { CatalogueTable } from "@/features/catalogue/components/catalogue-table";
import { CatalogueMap } from "@/features/catalogue/components/catalogue-map";

export function Component() {
  const [params, setParams] = useSearchParams();
  const filter = filterFromParams(params);
  const { data, isPending, error, isFetching } = useCatalogue(filter);
  const { data: me } = useMe();
  const filtered = !!(filter.q || filter.kind || filter.bbox || filter.from || filter.to || filter.variables);
  const go = (next: CatalogueFilter) => setParams(filterToParams(next), { replace: false });
  const fieldErrors = error instanceof ApiError ? error.fields : {};
  const pages = data ? Math.max(1, Math.ceil(data.total / data.pageSize)) : 1;

  return (
    <>
      <PageHeader
        title="Catalogue"
        description="Wind and ocean-current time series from moorings and drifting buoys, released after review by a second person. Each release is fixed, citable and free to download."
        actions={
          <ButtonLink to={paths.apiDocs()} variant="secondary">
            Download by script
          </ButtonLink>
        }
      />
      <div className="space-y-4">
        <CatalogueSearch filter={filter} fieldErrors={fieldErrors} onChange={go} />
        <div aria-live="polite" className="min-h-6 text-sm text-muted">
          {data && !isPending ? `${data.total} released dataset${data.total === 1 ? "" : "s"}${filtered ? " match" : ""}` : null}
          {isFetching && !isPending ? " · updating…" : null}
        </div>
        {isPending ? (
          <Loading label="Loading the catalogue…" />
        ) : error ? (
          <Alert tone="attention" title="The search could not run">
            {getErrorMessage(error)}
            {Object.keys(fieldErrors).length ? " Fix the fields marked above." : null}
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
              Try fewer words, a larger area, a wider time range or fewer variables.
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
          <>
            <CatalogueMap items={data.items} bbox={filter.bbox} onArea={(bbox) => go({ ...filter, bbox, page: 1 })} />
            <CatalogueTable items={data.items} />
            {pages > 1 ? (
              <nav aria-label="Pages" className="flex items-center justify-between gap-3">
                <Button variant="secondary" size="sm" disabled={data.page <= 1} onClick={() => go({ ...filter, page: data.page - 1 })}>
                  Previous page
                </Button>
                <span className="num text-sm text-muted">
                  Page {data.page} of {pages}
                </span>
                <Button variant="secondary" size="sm" disabled={data.page >= pages} onClick={() => go({ ...filter, page: data.page + 1 })}>
                  Next page
                </Button>
              </nav>
            ) : null}
          </>
        )}
      </div>
    </>
  );
}
export { RouteError as ErrorBoundary } from "@/components/layout/route-error";
