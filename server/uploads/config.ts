import { z } from "zod";

/** Upload settings from the environment (read once; a bad value stops start-up like server/env.ts). */
const schema = z.object({
  /** Largest accepted upload in bytes (default 5 GB). */
  UPLOAD_MAX_BYTES: z.coerce.number().int().positive().default(5_000_000_000),
  /** Unfinished uploads older than this are deleted with their parts. */
  UPLOAD_EXPIRY_HOURS: z.coerce.number().positive().default(48),
  /** How often the API process looks for expired parts. */
  UPLOAD_CLEANUP_INTERVAL_S: z.coerce.number().positive().default(900),
});

const parsed = schema.safeParse(process.env);
if (!parsed.success) {
  console.error(`Tauline cannot start: bad upload configuration\n${parsed.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`).join("\n")}`);
  process.exit(1);
}
export const uploadConfig = parsed.data;
