/**
 * The client side of the "upload" bench, run in its own process (as a browser would be) so that client work does not
 * share the server's event loop: `upload-client.ts put URL FILE` or `upload-client.ts tus ENDPOINT FILE COOKIE DATASET
 * CHUNK`. Prints one JSON line: { seconds, url? }.
 */
import { createReadStream, statSync } from "node:fs";
import http from "node:http";
import { performance } from "node:perf_hooks";
import * as tus from "tus-js-client";

const [mode, target, file, cookie, datasetId, chunk] = process.argv.slice(2);
const size = statSync(file!).size;
const t = performance.now();
if (mode === "put") {
  await new Promise<void>((resolve, reject) => {
    const req = http.request(target!, { method: "PUT", headers: { "content-length": String(size), "content-type": "text/csv" } }, (res) => {
      res.resume();
      res.on("end", () => (res.statusCode === 200 ? resolve() : reject(new Error(`PUT answered ${res.statusCode}`))));
    });
    req.on("error", reject);
    createReadStream(file!, { highWaterMark: 1 << 20 }).pipe(req);
  });
  process.stdout.write(JSON.stringify({ seconds: (performance.now() - t) / 1000 }) + "\n");
} else {
  const url = await new Promise<string>((resolve, reject) => {
    const u: tus.Upload = new tus.Upload(createReadStream(file!), {
      endpoint: target!,
      headers: { cookie: cookie! },
      chunkSize: Number(chunk),
      uploadSize: size,
      retryDelays: [],
      storeFingerprintForResuming: false,
      metadata: { datasetId: datasetId!, filename: "merrow-1hz-39d.csv", filetype: "text/csv" },
      onSuccess: () => resolve(u.url!),
      onError: reject,
    });
    u.start();
  });
  process.stdout.write(JSON.stringify({ seconds: (performance.now() - t) / 1000, url }) + "\n");
}
