import { spawn, type ChildProcess } from "node:child_process";
import { once } from "node:events";
import { readFileSync } from "node:fs";

/**
 * A real worker process (`server/worker.ts`) for a bench part, on the part's DATABASE_URL and STORAGE_DIR.
 * BENCH_PROFILE=DIR writes its CPU profile into DIR. `peakRssMb()` reads its VmHWM while it runs.
 */
export async function startBenchWorker(): Promise<{ proc: ChildProcess; peakRssMb(): number; stop(): Promise<void> }> {
  const profile = process.env.BENCH_PROFILE ? ["--cpu-prof", `--cpu-prof-dir=${process.env.BENCH_PROFILE}`] : [];
  const proc = spawn(process.execPath, [...profile, "--import", "tsx", "server/worker.ts"], {
    env: { ...process.env, NODE_ENV: "production", LOG_LEVEL: "info" },
    stdio: ["ignore", "pipe", "inherit"],
  });
  let out = "";
  proc.stdout!.on("data", (b) => (out += b));
  while (!out.includes("worker ready")) {
    if (proc.exitCode !== null) throw new Error(`worker exited: ${out}`);
    await new Promise((r) => setTimeout(r, 50));
  }
  return {
    proc,
    peakRssMb() {
      const status = readFileSync(`/proc/${proc.pid}/status`, "utf8");
      return Number(/VmHWM:\s+(\d+)/.exec(status)?.[1] ?? NaN) / 1024;
    },
    async stop() {
      if (proc.exitCode !== null) return;
      proc.kill("SIGTERM");
      await once(proc, "exit");
    },
  };
}
