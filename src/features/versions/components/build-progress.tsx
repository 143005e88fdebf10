import type { VersionDetail } from "@shared/schemas/versions";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { UtcTime } from "@/components/ui/utc-time";
import { useControlVersion } from "../api/control-version";

const stageWords: Record<string, string> = {
  queued: "waiting for a worker",
  reading: "reading, checking and storing records",
  summarising: "computing statistics and plot summaries",
  done: "done",
};

const fmt = new Intl.NumberFormat("en", { maximumFractionDigits: 0 });

/** Live progress of a build (percentage, rows/s, stage) with cancel and retry for contributors. */
export function BuildProgress({ version }: { version: VersionDetail }) {
  const p = version.progress;
  const cancel = useControlVersion(version.id, "cancel");
  const retry = useControlVersion(version.id, "retry");
  if (!p) return null;
  const running = version.state === "processing";
  const failed = version.state === "failed";
  return (
    <div className="space-y-3" aria-live="polite">
      <div className="flex flex-wrap items-center gap-x-6 gap-y-1 text-sm">
        <span>
          Stage: <strong>{p.runState === "cancelled" ? "cancelled" : p.runState === "failed" ? `stopped while ${stageWords[p.stage] ?? p.stage}` : (stageWords[p.stage] ?? p.stage)}</strong>
          {p.cancelRequested && running ? " (cancel requested)" : null}
        </span>
        <span>
          Rows stored: <span className="num">{fmt.format(p.rowsDone)}</span>
        </span>
        <span>
          Rate: <span className="num">{p.rowsPerS === null ? "—" : `${fmt.format(p.rowsPerS)} rows/s`}</span>
        </span>
        <span>
          Read: <span className="num">{(p.bytesDone / 1e6).toFixed(1)}</span> of <span className="num">{(p.bytesTotal / 1e6).toFixed(1)}</span> MB
        </span>
        {p.attempt > 1 ? (
          <span>
            Attempt <span className="num">{p.attempt}</span>
          </span>
        ) : null}
        {p.startedAt ? (
          <span>
            Started <UtcTime iso={p.startedAt} seconds />
          </span>
        ) : null}
        {p.finishedAt ? (
          <span>
            Finished <UtcTime iso={p.finishedAt} seconds />
          </span>
        ) : null}
      </div>
      <div className="flex items-center gap-3">
        <div
          role="progressbar"
          aria-label="Processing progress"
          aria-valuemin={0}
          aria-valuemax={100}
          aria-valuenow={p.percent}
          className="h-3 flex-1 overflow-hidden rounded-full border border-line bg-sunken"
        >
          <div className="h-full bg-accent transition-[width] duration-500" style={{ width: `${p.percent}%` }} />
        </div>
        <span className="num w-16 text-right">{p.percent.toFixed(0)} %</span>
      </div>
      {failed && p.error ? (
        <Alert tone="attention" title={p.runState === "cancelled" ? "Processing was cancelled" : "Processing failed"}>
          <p>{p.error.message}</p>
          {p.error.line !== undefined || p.error.column !== undefined ? (
            <p className="mt-1 text-sm">
              Where: {p.error.line !== undefined ? <>line <span className="num">{p.error.line}</span></> : null}
              {p.error.line !== undefined && p.error.column !== undefined ? ", " : null}
              {p.error.column !== undefined ? <>column “{p.error.column}”</> : null}. Fix the file or the column map, upload again and create a new version — or retry if the cause was
              temporary.
            </p>
          ) : null}
        </Alert>
      ) : null}
      {version.canControl && (running || failed) ? (
        <div className="flex gap-2">
          {running ? (
            <Button variant="secondary" disabled={cancel.isPending || p.cancelRequested} onClick={() => cancel.mutate()}>
              {p.cancelRequested ? "Cancelling…" : "Cancel processing"}
            </Button>
          ) : null}
          {failed ? (
            <Button disabled={retry.isPending} onClick={() => retry.mutate()}>
              {retry.isPending ? "Retrying…" : "Retry processing"}
            </Button>
          ) : null}
        </div>
      ) : null}
    </div>
  );
}
