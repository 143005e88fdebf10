import { useState } from "react";
import { Link, useNavigate, useParams } from "react-router-dom";
import type { ColumnMapInput } from "@shared/schemas/column-map";
import { delimiterNames, type PreviewQuery } from "@shared/schemas/uploads";
import { paths } from "@/config/paths";
import { getErrorMessage } from "@/lib/api-client";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { Loading } from "@/components/ui/loading";
import { PageHeader } from "@/components/ui/page-header";
import { Panel, Section } from "@/components/ui/section";
import { UtcTime } from "@/components/ui/utc-time";
import { useDataset } from "@/features/datasets/api/get-dataset";
import { useUpload } from "@/features/uploads/api/get-upload";
import { useProcessUpload } from "@/features/uploads/api/process-upload";
import { FindingsList } from "@/features/uploads/components/findings-list";
import { describeDelimiter, formatBytes } from "@/features/uploads/components/format";
import { PreviewTable } from "@/features/uploads/components/preview-table";
import { useColumnMaps } from "@/features/column-maps/api/get-column-maps";
import { ColumnMapEditor } from "@/features/column-maps/components/column-map-editor";

const control = "block w-full rounded-md border border-field bg-surface px-2 py-1.5 text-fg";

/** One upload: what the server found, the first rows with an editable dialect, the column map, then processing. */
export function Component() {
  const { datasetId = "", uploadId = "" } = useParams();
  const navigate = useNavigate();
  const [dialect, setDialect] = useState<PreviewQuery>({});
  const { data: dataset } = useDataset(datasetId);
  const { data: u, isPending, error, isFetching } = useUpload(uploadId, dialect);
  const { data: history = [] } = useColumnMaps(u?.platformId ?? null);
  const process = useProcessUpload(datasetId);
  const [mode, setMode] = useState<"replace" | "append">("replace");
  const [processError, setProcessError] = useState<string | null>(null);

  if (isPending) return <Loading label="Loading the upload…" />;
  if (error) throw error;
  const d = u.dialect;
  const hasVersions = (dataset?.versions.length ?? 0) > 0;

  return (
    <>
      <PageHeader
        eyebrow={
          <nav aria-label="Breadcrumb" className="flex flex-wrap gap-1">
            <Link to={paths.dataset(datasetId)}>{dataset?.title ?? "Dataset"}</Link> <span aria-hidden>/</span> <span>Upload</span>
          </nav>
        }
        title={`Map columns: ${u.originalName}`}
        description="Check how Tauline reads the file, map each column to a variable, then process it into a new version."
      />

      <div className="grid gap-8 xl:grid-cols-[1fr_18rem]">
        <div className="min-w-0 space-y-10">
          <Section title="What the server found" description={u.status === "checking" ? "The whole file is being checked; this updates by itself." : undefined}>
            {u.status === "checking" ? (
              <p role="status" className="text-muted">
                Checking every line of the file…
              </p>
            ) : u.findings.length ? (
              <FindingsList findings={u.findings} />
            ) : (
              <Alert tone="success">
                No problems found in <span className="num">{(u.dataLineCount ?? 0).toLocaleString("en-GB")}</span> data lines.
              </Alert>
            )}
          </Section>

          <Section title="How the file is read" description="Detected by the server. Change a setting if the preview looks wrong; the map below follows it.">
            {d ? (
              <div className="grid gap-3 sm:grid-cols-4" data-testid="dialect">
                <label className="flex flex-col gap-1 text-sm font-semibold">
                  Delimiter
                  <select className={control} value={delimiterNames[d.delimiter]} onChange={(e) => setDialect((x) => ({ ...x, delimiter: e.target.value as PreviewQuery["delimiter"] }))}>
                    <option value="comma">Comma</option>
                    <option value="semicolon">Semicolon</option>
                    <option value="tab">Tab</option>
                    <option value="space">Spaces (runs of whitespace)</option>
                  </select>
                </label>
                <label className="flex flex-col gap-1 text-sm font-semibold">
                  Decimal mark
                  <select className={control} value={d.decimalMark === "." ? "point" : "comma"} onChange={(e) => setDialect((x) => ({ ...x, decimalMark: e.target.value as "point" | "comma" }))}>
                    <option value="point">Point (12.5)</option>
                    <option value="comma">Comma (12,5)</option>
                  </select>
                </label>
                <label className="flex flex-col gap-1 text-sm font-semibold">
                  Header line (0 = none)
                  <input className={`${control} num`} type="number" min={0} max={50} value={d.headerRow} onChange={(e) => setDialect((x) => ({ ...x, headerRow: Math.max(0, Math.min(50, Number(e.target.value) || 0)) }))} />
                </label>
                <label className="flex flex-col gap-1 text-sm font-semibold">
                  Lines after the header to skip
                  <input className={`${control} num`} type="number" min={0} max={50} value={d.skipRows} onChange={(e) => setDialect((x) => ({ ...x, skipRows: Math.max(0, Math.min(50, Number(e.target.value) || 0)) }))} />
                </label>
                <p className="text-sm text-muted sm:col-span-4">
                  Encoding {u.encoding === "utf-8-bom" ? "UTF-8 with a byte-order mark" : "UTF-8"}; line endings {d.lineEnding.toUpperCase()}; detected delimiter {u.detected ? describeDelimiter(u.detected.delimiter) : "—"}.
                  {isFetching ? " Re-reading…" : ""}
                </p>
              </div>
            ) : null}
            <PreviewTable header={u.preview.header} rows={u.preview.rows} lines={u.preview.lines} caption={`First ${u.preview.rows.length} data rows of ${u.originalName}`} />
          </Section>

          <Section title="Column map" description={u.platformName ? `Saved per platform (${u.platformName}), so next month's file is one click.` : undefined}>
            {d && u.status !== "unusable" ? (
              <ColumnMapEditor
                key={JSON.stringify(d)}
                header={u.preview.header}
                rows={u.preview.rows}
                dialect={d}
                initial={(u.suggestion?.map as ColumnMapInput | undefined) ?? null}
                initialSource={u.suggestion?.source ?? null}
                notes={u.suggestion?.notes ?? []}
                platformId={u.platformId}
                uploadId={u.id}
                history={history}
                actions={(map) => (
                  <div className="flex items-end gap-2">
                    {hasVersions ? (
                      <label className="flex flex-col gap-1 text-sm font-semibold">
                        Build
                        <select className={control} value={mode} onChange={(e) => setMode(e.target.value as "replace" | "append")}>
                          <option value="replace">A new version from this file alone</option>
                          <option value="append">The latest version plus this file</option>
                        </select>
                      </label>
                    ) : null}
                    <Button
                      disabled={!map}
                      busy={process.isPending}
                      onClick={() => {
                        if (!map) return;
                        setProcessError(null);
                        process.mutate({ uploadId: u.id, columnMap: map, mode: hasVersions ? mode : "replace" }, { onSuccess: (v) => navigate(paths.version(v.id)), onError: (e) => setProcessError(getErrorMessage(e)) });
                      }}
                    >
                      Process this upload
                    </Button>
                  </div>
                )}
              />
            ) : (
              <Alert tone="attention">This file cannot be processed. Fix the problems listed above in the logger export and upload it again.</Alert>
            )}
            {processError ? (
              <Alert tone="attention" title="Processing did not start">
                {processError}
              </Alert>
            ) : null}
          </Section>
        </div>

        <aside aria-label="Upload details">
          <Panel>
            <h2 className="mb-3 font-semibold">Upload</h2>
            <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-2 text-[0.95rem]">
              <dt className="text-muted">File</dt>
              <dd className="break-all">{u.originalName}</dd>
              <dt className="text-muted">Size</dt>
              <dd className="num">{formatBytes(u.sizeBytes)}</dd>
              <dt className="whitespace-nowrap text-muted">SHA-256</dt>
              <dd className="num min-w-0 break-all text-xs whitespace-normal!" data-testid="upload-sha256">
                {u.sha256}
              </dd>
              <dt className="text-muted">By</dt>
              <dd>{u.uploaderName ?? "—"}</dd>
              <dt className="text-muted">When</dt>
              <dd>
                <UtcTime iso={u.createdAt} />
              </dd>
            </dl>
          </Panel>
        </aside>
      </div>
    </>
  );
}
export { RouteError as ErrorBoundary } from "@/components/layout/route-error";
