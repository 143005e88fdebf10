import { parentPort, workerData } from "node:worker_threads";
import type { ColumnMap } from "@shared/schemas/column-map";
import { InputError, openCanonicalStream } from "./read-csv";

/**
 * Worker thread: reads and canonicalises an upload so parsing runs on its own core beside the engine and the COPY.
 * Sends each chunk with its typed arrays transferred (no copy); keeps at most `window` chunks ahead of the consumer.
 */
const { path, map, label, chunkBytes, window } = workerData as { path: string; map: ColumnMap; label: string; chunkBytes: number; window: number };
const port = parentPort!;
let credit = window;
let wake: (() => void) | null = null;
port.on("message", (m: { more: number }) => {
  credit += m.more;
  wake?.();
  wake = null;
});

try {
  let bytes = 0;
  const { canonicalizer, chunks } = await openCanonicalStream(path, map, { label, chunkBytes, onBytes: (b) => (bytes = b) });
  port.postMessage({ kind: "ready", variables: canonicalizer.variables });
  let sentIds = 0;
  for await (const { chunk, warnings } of chunks) {
    while (credit <= 0) await new Promise<void>((r) => (wake = r));
    credit--;
    const ids = canonicalizer.platformIds.slice(sentIds);
    sentIds = canonicalizer.platformIds.length;
    const transfer = [chunk.time, chunk.line, chunk.recordBad, ...(chunk.platform ? [chunk.platform] : []), ...Object.values(chunk.values), ...Object.values(chunk.bad)].map(
      (a) => (a as ArrayBufferView).buffer as ArrayBuffer,
    );
    port.postMessage({ kind: "chunk", chunk, warnings, ids, bytes }, [...new Set(transfer)]);
  }
  port.postMessage({ kind: "end" });
} catch (e) {
  if (e instanceof InputError) port.postMessage({ kind: "input-error", message: e.message, line: e.line, column: e.column });
  else port.postMessage({ kind: "error", message: (e as Error).message });
}
