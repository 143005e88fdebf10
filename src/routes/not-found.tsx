import { paths } from "@/config/paths";
import { useDocumentTitle } from "@/lib/use-document-title";
import { ButtonLink } from "@/components/ui/button";

export function Component() {
  useDocumentTitle("Page not found");
  return (
    <div className="mx-auto max-w-xl py-10 text-center">
      <p className="num text-sm text-signal">Error 404</p>
      <h1 className="mt-1 text-3xl font-bold">Page not found</h1>
      <p className="mt-2 text-muted">There is no page at this address. The link may be mistyped, or the page may have moved.</p>
      <div className="mt-6 flex justify-center gap-2">
        <ButtonLink to={paths.home()} variant="primary">
          Go to the catalogue
        </ButtonLink>
        <ButtonLink to={paths.projects()}>My projects</ButtonLink>
      </div>
    </div>
  );
}
