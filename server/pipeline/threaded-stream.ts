import { Worker } from "node:worker_threads";
import type { ColumnMap } from "@shared/schemas/column-map";
import type { ParseWarning, RecordChunk } from "@shared/compute/canonical";
import type { MeasuredVariable } from "@shared/vocabulary";
import { InputError, type StreamOptions } from "./read-csv";

type Msg =
  | { kind: "ready"; variables: MeasuredVariable[] }
  | { kind: "chunk"; chunk: RecordChunk; warnings: ParseWarning[]; ids: string[]; bytes: number }
  | { kind: "end" }
  | { kind: "input-error"; message: string; line?: number; column?: string }
  | { kind: "error"; message: string };

/**
 * `openCanonicalStream` on a worker thread: same chunks, same errors (InputError with line and column), with
 * parsing overlapping the caller's work. `platformIds` grows as chunks arrive, as the canonicalizer's does.
 */
export async function openThreadedCanonicalStream(path: string, map: ColumnMap, opts: StreamOptions & { window?: number } = {}) {
  const window = opts.window ?? 3;
  const worker = new Worker(new URL("./parse-worker.mjs", import.meta.url), {
    workerData: { path, map, label: opts.label ?? path, chunkBytes: opts.chunkBytes ?? 1 << 20, window },
  });
  const queue: Msg[] = [];
  let waiting: ((m: Msg) => void) | null = null;
  let failed: Error | null = null;
  const push = (m: Msg) => {
    if (waiting) {
      const w = waiting;
      waiting = null;
      w(m);
    } else queue.push(m);
  };
  worker.on("message", push);
  worker.on("error", (e) => push({ kind: "error", message: e.message }));
  worker.on("exit", (code) => code !== 0 && push({ kind: "error", message: `parser thread exited with code ${code}` }));
  const next = () => new Promise<Msg>((resolve) => (queue.length ? resolve(queue.shift()!) : (waiting = resolve)));
  const raise = (m: Msg): never => {
    void worker.terminate();
    if (m.kind === "input-error") throw new InputError(m.message, m.line, m.column);
    throw (failed = new Error(m.kind === "error" ? m.message : `unexpected message ${m.kind}`));
  };

  const first = await next();
  if (first.kind !== "ready") raise(first);
  const platformIds: string[] = [];
  const canonicalizer = { variables: (first as { variables: MeasuredVariable[] }).variables, platformIds };

  async function* chunks(): AsyncGenerator<{ chunk: RecordChunk; warnings: ParseWarning[] }> {
    try {
      for (;;) {
        const m = await next();
        if (m.kind === "end") return;
        if (m.kind !== "chunk") raise(m);
        const c = m as Extract<Msg, { kind: "chunk" }>;
        platformIds.push(...c.ids);
        opts.onBytes?.(c.bytes);
        worker.postMessage({ more: 1 });
        yield { chunk: c.chunk, warnings: c.warnings };
      }
    } finally {
      if (!failed) void worker.terminate();
    }
  }
  /** Stops the parser thread (idempotent); call when the consumer stops early. */
  const close = () => void worker.terminate();
  return { canonicalizer, chunks: chunks(), close };
}
