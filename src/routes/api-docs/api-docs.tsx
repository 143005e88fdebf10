import { useQuery } from "@tanstack/react-query";
import { Link } from "react-router-dom";
import { api } from "@/lib/api-client";
import { useMe } from "@/lib/session";
import { paths } from "@/config/paths";
import { PageHeader } from "@/components/ui/page-header";
import { Section } from "@/components/ui/section";
import { Table, Td, Th, Tr } from "@/components/ui/table";
import { Snippet } from "@/features/downloads/components/script-examples";
import { TokenManager } from "@/features/tokens/components/token-manager";

type Operation = { summary: string; description?: string; tags?: string[]; parameters?: { name: string; in: string; required?: boolean; description?: string }[] };
type OpenApi = { info: { version: string }; paths: Record<string, Record<string, Operation>> };

const origin = () => window.location.origin;

const curl = () =>
  [
    "# Find released datasets with wind stress in an area",
    `curl -s "${origin()}/api/v1/catalogue?q=stress&bbox=-30,40,-5,60"`,
    "",
    "# Download a version's passing values as CSV (released: no token needed)",
    `curl -fL -o series.csv "${origin()}/api/v1/versions/VERSION_ID/download?format=csv&qc=pass"`,
    "",
    "# Drafts of your own projects need a token",
    `curl -fL -H "Authorization: Bearer $TAULINE_TOKEN" -o draft.parquet \\`,
    `  "${origin()}/api/v1/versions/VERSION_ID/download?format=parquet"`,
  ].join("\n");

const python = () =>
  [
    "import os, requests",
    "",
    `base = "${origin()}/api/v1"`,
    'headers = {"Authorization": f"Bearer {os.environ[\'TAULINE_TOKEN\']}"}',
    "",
    'page = requests.get(f"{base}/catalogue", params={"q": "merrow", "kind": "mooring"}, timeout=30).json()',
    'for item in page["items"]:',
    '    url = f"{base}/versions/{item[\'releasedVersionId\']}/download"',
    '    params = {"format": "csv", "from": "2026-03-01T00:00:00Z"}',
    "    with requests.get(url, params=params, headers=headers, stream=True, timeout=60) as r:",
    "        r.raise_for_status()",
    '        with open(f"{item[\'id\']}.csv", "wb") as f:',
    "            for chunk in r.iter_content(1 << 20):",
    "                f.write(chunk)",
  ].join("\n");

const upload = () =>
  [
    "# Uploads are resumable (tus 1.0). With a token of scope upload, e.g. with the tus-py-client package:",
    "import os",
    "from tusclient import client",
    "",
    'token = os.environ["TAULINE_TOKEN"]',
    `tus = client.TusClient("${origin()}/api/uploads", headers={"Authorization": f"Bearer {token}"})`,
    "tus.uploader(",
    '    "logger-export.csv",',
    '    metadata={"datasetId": "DATASET_ID", "filename": "logger-export.csv"},',
    "    chunk_size=8 << 20,",
    ").upload()",
  ].join("\n");

export function Component() {
  const { data: me } = useMe();
  const { data: doc } = useQuery({ queryKey: ["openapi"], queryFn: ({ signal }) => api.get<OpenApi>("/api/v1/openapi.json", signal), staleTime: Infinity });
  const ops = doc ? Object.entries(doc.paths).flatMap(([path, methods]) => Object.entries(methods).map(([method, op]) => ({ path, method: method.toUpperCase(), op }))) : [];
  return (
    <>
      <PageHeader
        title="API"
        description="Everything in the catalogue can be found and downloaded by script. Version 1 of the API is stable: fields are added, never renamed or removed."
        actions={
          <a className="rounded-md border border-line px-3 py-2 text-sm" href="/api/v1/openapi.json" download="tauline-openapi.json">
            OpenAPI 3.1 document
          </a>
        }
      />
      <div className="max-w-5xl space-y-10">
        <Section title="Personal API tokens" description="Scripts send a token instead of signing in: Authorization: Bearer tln_… . Tokens read what you can read; a token of scope upload can also send files.">
          {me ? (
            <TokenManager />
          ) : (
            <p>
              <Link to={paths.signIn(paths.apiDocs())}>Sign in</Link> to make tokens. Released data needs no token.
            </p>
          )}
        </Section>
        <Section title="Examples" description="Replace VERSION_ID with the id from a dataset page or a catalogue answer (releasedVersionId). Anonymous downloads are limited per minute; a token lifts the limit.">
          <div className="space-y-4">
            <Snippet title="curl" code={curl()} />
            <Snippet title="Python" code={python()} />
            <Snippet title="Upload from Python" code={upload()} />
          </div>
        </Section>
        <Section title="Endpoints" description="Generated from the same schemas the server checks requests with.">
          {doc ? (
            <Table caption="API version 1">
              <thead>
                <tr>
                  <Th>Method</Th>
                  <Th>Path</Th>
                  <Th>What it does</Th>
                  <Th>Parameters</Th>
                </tr>
              </thead>
              <tbody>
                {ops.map(({ path, method, op }) => (
                  <Tr key={`${method} ${path}`}>
                    <Td>
                      <code className="text-sm font-semibold">{method}</code>
                    </Td>
                    <Td>
                      <code className="text-sm">{path}</code>
                    </Td>
                    <Td>
                      <div>{op.summary}</div>
                      {op.description ? <div className="whitespace-pre-line text-sm text-muted">{op.description}</div> : null}
                    </Td>
                    <Td className="text-sm">
                      {(op.parameters ?? [])
                        .filter((p) => p.in === "query")
                        .map((p) => (
                          <code key={p.name} className="mr-2 inline-block">
                            {p.name}
                          </code>
                        ))}
                    </Td>
                  </Tr>
                ))}
              </tbody>
            </Table>
          ) : (
            <p className="text-sm text-muted">Loading the endpoint list…</p>
          )}
        </Section>
      </div>
    </>
  );
}
export { RouteError as ErrorBoundary } from "@/components/layout/route-error";
