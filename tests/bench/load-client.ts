/**
 * The client side of the "catalogue" bench, run in its own process as real clients would be, so that their HTTP
 * work does not share the server's event loop: `load-client.ts '{"base","paths","connections","seconds"}'`.
 * Cycles the connections through `paths` with autocannon and prints one JSON line: rps, requests, non_2xx and
 * every response's latency in ms (the parent takes the percentiles).
 */
import autocannon from "autocannon";

const { base, paths, connections, seconds } = JSON.parse(process.argv[2]!) as { base: string; paths: string[]; connections: number; seconds: number };
const latencies: number[] = [];
let non2xx = 0;
const instance = autocannon({ url: base, connections, duration: seconds, requests: paths.map((path) => ({ method: "GET" as const, path })) }, (err, result) => {
  if (err) {
    process.stderr.write(`${err.stack ?? err}\n`);
    process.exit(1);
  }
  process.stdout.write(JSON.stringify({ rps: result.requests.average, requests: latencies.length, non_2xx: non2xx, errors: result.errors, latencies }) + "\n");
});
instance.on("response", (_client, status, _bytes, ms) => {
  if (status !== 200) non2xx++;
  latencies.push(ms);
});
