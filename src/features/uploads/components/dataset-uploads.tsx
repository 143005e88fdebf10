import { Alert } from "@/components/ui/alert";
import { EmptyState } from "@/components/ui/empty-state";
import { Loading } from "@/components/ui/loading";
import { getErrorMessage } from "@/lib/api-client";
import { useDatasetUploads } from "../api/get-dataset-uploads";
import { UploadDropzone } from "./upload-dropzone";
import { UploadsTable } from "./uploads-table";

/** The dataset page's upload area: the drop zone (for contributors) and the uploads recorded so far. */
export function DatasetUploads({ datasetId, canUpload }: { datasetId: string; canUpload: boolean }) {
  const { data, isPending, error } = useDatasetUploads(datasetId);
  return (
    <div className="space-y-5">
      {canUpload ? <UploadDropzone datasetId={datasetId} savedMap={data?.savedMap ?? null} /> : null}
      {isPending ? (
        <Loading label="Loading uploads…" />
      ) : error ? (
        <Alert tone="attention">{getErrorMessage(error)}</Alert>
      ) : data.items.length === 0 ? (
        <EmptyState title="No uploads yet">Drop a logger export above. When it has arrived, map its columns and process it into a version.</EmptyState>
      ) : (
        <UploadsTable items={data.items} datasetId={datasetId} canMap={canUpload} />
      )}
    </div>
  );
}
