import "../shared/schemas/messages";
import { Command, InvalidArgumentError } from "commander";
import { InputError } from "./lib/read-csv";
import { runCheck } from "./check";

// A closed pipe (e.g. output piped into `head`) is not an error worth a stack trace.
process.stdout.on("error", (e: NodeJS.ErrnoException) => {
  if (e.code === "EPIPE") process.exit(0);
});

const num = (v: string) => {
  const x = Number(v);
  if (v.trim() === "" || !Number.isFinite(x)) throw new InvalidArgumentError("expected a number");
  return x;
};

const program = new Command("tauline")
  .description("Tauline command-line tools for mooring and drifter time series")
  .showHelpAfterError(false);

program
  .command("check")
  .description("run Tauline's QC and air-sea diagnostics on a local file and write one row per record")
  .argument("<file>", "delimited text file (CSV)")
  .requiredOption("--map <map.json>", "column map (JSON) describing the file's columns")
  .option("--out <out.csv>", "where to write the checked records")
  .option("--settings <qc.json>", "QC settings overrides (JSON)")
  .option("--lat <degrees>", "deployment latitude, when the file has none", num)
  .option("--lon <degrees>", "deployment longitude, when the file has none", num)
  .option("--wind-height <m>", "anemometer height above the sea surface", num)
  .option("--current-depth <m>", "current-meter depth", num)
  .option("--drag-law <law>", "LP81, T90, LY04, LY09, YT96 or S88")
  .option("--coastline-deg <degrees>", "bearing of the normal from land out to sea, for the upwelling index", num)
  .option("--platform-kind <kind>", "mooring or drifter")
  .option("--interval <s>", "nominal sampling interval in seconds (inferred when absent)", num)
  .option("--watch-circle <m>", "mooring watch-circle radius around --lat/--lon", num)
  .action(async (file: string, opts) => {
    await runCheck(file, opts, (line) => process.stdout.write(line + "\n"));
  });

try {
  await program.parseAsync(process.argv);
} catch (e) {
  const msg = e instanceof InputError ? e.message : `internal error: ${(e as Error)?.message ?? String(e)}`;
  process.stderr.write(`tauline: ${msg}\n`);
  process.exitCode = e instanceof InputError ? 2 : 1;
}
