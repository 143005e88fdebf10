import { useEffect, useRef, useState } from "react";
import Uppy from "@uppy/core";
import Tus from "@uppy/tus";
import Dashboard from "@uppy/react/dashboard";
import "@uppy/core/css/style.min.css";
import "@uppy/dashboard/css/style.min.css";
import { useQueryClient } from "@tanstack/react-query";
import { showToast } from "@/lib/toast";
import { paths } from "@/config/paths";
import { Alert } from "@/components/ui/alert";
import { ButtonLink } from "@/components/ui/button";
import { uploadKeys } from "../api/get-dataset-uploads";
import type { LocalCheckMessage } from "../workers/local-check-protocol";
import { LocalCheckPanel, type LocalCheckState } from "./local-check-panel";
import { tusErrorMessage } from "./format";

/** Follows the app's light/dark class on <html> (set by the theme toggle). */
function useDarkClass(): boolean {
  const [dark, setDark] = useState(() => document.documentElement.classList.contains("dark"));
  useEffect(() => {
    const o = new MutationObserver(() => setDark(document.documentElement.classList.contains("dark")));
    o.observe(document.documentElement, { attributes: true, attributeFilter: ["class"] });
    return () => o.disconnect();
  }, []);
  return dark;
}

/** 50 MB parts: few round trips on fast links, little to resend on a flaky one. */
const CHUNK_BYTES = 50 * 1024 * 1024;

/**
 * Drag-and-drop resumable upload of a logger file into a dataset. While the file uploads, a worker reads the same
 * file locally and shows its dialect, first rows, problems and a first QC pass. Picking the same file again after a
 * reload or a closed tab resumes from what the server already has.
 */
export function UploadDropzone({ datasetId, savedMap }: { datasetId: string; savedMap: unknown | null }) {
  const qc = useQueryClient();
  const dark = useDarkClass();
  const [check, setCheck] = useState<LocalCheckState | null>(null);
  const worker = useRef<Worker | null>(null);
  const savedMapRef = useRef(savedMap);
  savedMapRef.current = savedMap;
  const [uploaded, setUploaded] = useState<{ id: string; name: string } | null>(null);

  const [uppy] = useState(() =>
    new Uppy({
      id: `dataset-${datasetId}`,
      autoProceed: true,
      restrictions: { maxNumberOfFiles: 1, allowedFileTypes: [".csv", ".tsv", ".txt", ".dat"] },
      meta: { datasetId },
    }).use(Tus, { endpoint: "/api/uploads", chunkSize: CHUNK_BYTES, retryDelays: [0, 1000, 3000, 5000, 10000], removeFingerprintOnSuccess: true }),
  );

  useEffect(() => {
    const startCheck = (file: { name?: string; data: Blob | File }) => {
      worker.current?.terminate();
      setUploaded(null);
      const name = file.name ?? "file";
      setCheck({ fileName: name });
      if (!(file.data instanceof File)) return;
      const w = new Worker(new URL("../workers/local-check.worker.ts", import.meta.url), { type: "module" });
      worker.current = w;
      w.onmessage = (e: MessageEvent<LocalCheckMessage>) => {
        const m = e.data;
        setCheck((s) => {
          const base = s ?? { fileName: name };
          if (m.type === "refused") return { ...base, refused: m.message };
          if (m.type === "error") return { ...base, error: m.message };
          if (m.type === "preview") return { ...base, preview: m };
          if (m.type === "progress") return { ...base, progress: { bytes: m.bytes, total: m.total } };
          return { ...base, done: { scan: m.scan, qc: m.qc } };
        });
        if (m.type === "done" || m.type === "refused" || m.type === "error") w.terminate();
      };
      w.postMessage({ file: file.data, savedMap: savedMapRef.current });
    };
    const onAdded = (file: { name?: string; data: Blob | File }) => startCheck(file);
    const onSuccess = (file: { name?: string } | undefined, response: { uploadURL?: string }) => {
      const id = (response.uploadURL ?? "").split("/").pop();
      // Refresh the uploads table first, so the new row is there when the next step is offered.
      void qc.invalidateQueries({ queryKey: uploadKeys.dataset(datasetId) }).finally(() => {
        if (id) setUploaded({ id, name: file?.name ?? "the file" });
      });
    };
    const onError = (_file: unknown, err: unknown) => showToast(tusErrorMessage(err), "error", 12000);
    uppy.on("file-added", onAdded as never);
    uppy.on("upload-success", onSuccess as never);
    uppy.on("upload-error", onError as never);
    return () => {
      uppy.off("file-added", onAdded as never);
      uppy.off("upload-success", onSuccess as never);
      uppy.off("upload-error", onError as never);
    };
  }, [uppy, qc, datasetId]);

  useEffect(() => () => {
    worker.current?.terminate();
    uppy.destroy();
  }, [uppy]);

  return (
    <div className="space-y-4" data-testid="upload-dropzone">
      <Dashboard
        uppy={uppy}
        height={300}
        width="100%"
        theme={dark ? "dark" : "light"}
        proudlyDisplayPoweredByUppy={false}
        hideProgressDetails={false}
        note="Logger exports as CSV, TSV or text, UTF-8, up to 5 GB. If the connection drops or you close the tab, pick the same file again: the upload continues where it stopped."
      />
      {uploaded ? (
        <Alert tone="success" title={`${uploaded.name} has arrived and is stored with its SHA-256.`}>
          <p className="mb-2">The server has read it too. Next, check how its columns map to variables, then process it into a version.</p>
          <ButtonLink variant="primary" to={paths.uploadMap(datasetId, uploaded.id)}>
            Map columns and process
          </ButtonLink>
        </Alert>
      ) : null}
      {check ? <LocalCheckPanel state={check} /> : null}
    </div>
  );
}
