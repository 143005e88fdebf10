/// <reference lib="webworker" />
import Papa from "papaparse";
import { createCanonicalizer, type ParseWarning } from "@shared/compute/canonical";
import { createEngine, type Engine } from "@shared/compute/engine";
import { inferInterval } from "@shared/compute/timing";
import { resolveQcSettings } from "@shared/schemas/qc-settings";
import { checkColumnMap, createScanner, detectEncoding, previewRows, sniffDialect, suggestColumnMap } from "@shared/sniff";
import type { LocalCheckMessage, LocalCheckRequest } from "./local-check-protocol";

/**
 * Reads the chosen file in the browser while it uploads: sniffs it, previews 50 rows, scans it for problems and
 * runs the shared QC engine through the platform's saved map (or the suggested one). The server repeats the
 * sniffing and scan after the upload and is the authority.
 */
const post = (m: LocalCheckMessage) => (self as unknown as DedicatedWorkerGlobalScope).postMessage(m);
const HEAD = 1 << 20;
const PIECE = 4 << 20;

async function run({ file, savedMap }: LocalCheckRequest) {
  const headBytes = new Uint8Array(await file.slice(0, HEAD).arrayBuffer());
  const complete = headBytes.length >= file.size;
  const verdict = detectEncoding(headBytes, complete);
  if (!verdict.ok) return post({ type: "refused", message: verdict.message });
  const headText = new TextDecoder().decode(headBytes.subarray(verdict.bomBytes));
  const sniff = sniffDialect(headText, complete);
  const preview = previewRows(headText, sniff.dialect, 50, complete);

  let mapSource: "platform" | "suggested" | null = null;
  let map = null;
  let mapProblems: string[] = [];
  if (savedMap) {
    const c = checkColumnMap(savedMap, preview.header);
    if (c.ok) (map = c.map), (mapSource = "platform");
    else mapProblems = c.problems.map((p) => p.message);
  }
  if (!map) {
    const s = suggestColumnMap(preview.header, preview.rows, sniff.dialect, null);
    const c = checkColumnMap(s.map, preview.header);
    if (c.ok) (map = c.map), (mapSource = "suggested");
    else if (!savedMap) mapProblems = c.problems.map((p) => p.message);
  }
  post({ type: "preview", dialect: sniff.dialect, header: preview.header, rows: preview.rows, lines: preview.lines, mapSource, mapProblems });

  const scanner = createScanner(sniff.dialect, sniff.header);
  const canon = map ? createCanonicalizer(map) : null;
  const bound = canon ? canon.bindHeader(map!.headerRow > 0 ? preview.header : null, map!.headerRow) : null;
  const useEngine = canon && bound?.ok && map!.delimiter !== " ";
  let engine: Engine | null = null;
  const settings = resolveQcSettings({});
  const warnings: ParseWarning[] = [];
  let warningCount = 0;
  const skip = map ? map.headerRow + map.skipRows : 0;
  let line = 1;
  let carry = "";
  const decoder = new TextDecoder();
  const reader = file.stream().getReader();
  let bytes = 0;
  let first = true;
  let lastPosted = 0;
  const feed = (text: string) => {
    if (!useEngine || !canon || !settings.success) return;
    let rows = Papa.parse<string[]>(text, { delimiter: map!.delimiter }).data;
    if (rows.length && rows[rows.length - 1]!.length === 1 && rows[rows.length - 1]![0] === "") rows.pop();
    const start = line;
    line += rows.length;
    if (start <= skip) {
      rows = rows.slice(skip - start + 1);
      if (!rows.length) return;
    }
    const firstLine = Math.max(start, skip + 1);
    const { chunk, warnings: w } = canon.convert(rows, firstLine);
    warningCount += w.length;
    for (const x of w) if (warnings.length < 10) warnings.push(x);
    if (!engine) {
      if (settings.data.timing.expectedIntervalS === null) {
        const dt = inferInterval(chunk.time, chunk.platform);
        if (Number.isFinite(dt)) settings.data.timing.expectedIntervalS = dt;
      }
      engine = createEngine(settings.data, { platformKind: map!.platformColumn !== undefined ? "drifter" : "mooring" }, canon.variables);
    }
    engine.push(chunk);
  };
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    bytes += value.length;
    let text = decoder.decode(first && verdict.bomBytes ? value.subarray(verdict.bomBytes) : value, { stream: true });
    first = false;
    scanner.push(text);
    text = carry + text;
    const cut = text.lastIndexOf("\n");
    if (cut < 0) carry = text.length > PIECE * 2 ? "" : text;
    else {
      carry = text.slice(cut + 1);
      feed(text.slice(0, cut + 1));
    }
    if (bytes - lastPosted >= 2 << 20) {
      lastPosted = bytes;
      post({ type: "progress", bytes, total: file.size });
    }
  }
  const tail = decoder.decode();
  scanner.push(tail);
  if (carry + tail) feed(carry + tail);
  const scan = scanner.finish();
  let qc = null;
  if (engine) {
    (engine as Engine).finish();
    const s = (engine as Engine).summary();
    qc = { rows: s.rows, timeMin: s.timeMin, timeMax: s.timeMax, flagCounts: s.flagCounts as Record<string, number[]>, warningCount, warnings };
  }
  post({ type: "done", scan, qc, mapSource });
}

self.onmessage = (e: MessageEvent<LocalCheckRequest>) => {
  run(e.data).catch((err: unknown) => post({ type: "error", message: `The browser could not read the file: ${(err as Error).message ?? String(err)}` }));
};
