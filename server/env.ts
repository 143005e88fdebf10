import { z } from "zod";

/** Server configuration from the environment, with safe local defaults. A bad value stops start-up. */
const envSchema = z.object({
  NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
  PORT: z.coerce.number().int().min(0).max(65535).default(3000),
  HOST: z.string().default("127.0.0.1"),
  DATABASE_URL: z.string().default("postgres://postgres@127.0.0.1:54329/tauline"),
  /** The origin users reach the app at; better-auth checks Origin headers against it. */
  PUBLIC_URL: z.url().default("http://127.0.0.1:3000"),
  AUTH_SECRET: z.string().min(32, "AUTH_SECRET must be at least 32 characters").default("tauline-local-development-secret-change-me-0123456789"),
  SMTP_HOST: z.string().default("127.0.0.1"),
  SMTP_PORT: z.coerce.number().int().default(2525),
  MAIL_FROM: z.string().default("Tauline <no-reply@tauline.invalid>"),
  STORAGE_DIR: z.string().default("storage"),
  LOG_LEVEL: z.enum(["fatal", "error", "warn", "info", "debug", "trace", "silent"]).default("info"),
  /** Demo mode seeds invented data and prints demo credentials. */
  DEMO: z.stringbool().default(false),
  /** Sign-in attempts allowed per window (per IP); lowered in tests of the limiter. */
  AUTH_RATE_LIMIT: z.coerce.number().int().positive().default(10),
  AUTH_RATE_WINDOW_S: z.coerce.number().int().positive().default(60),
  /** Attempts per window per e-mail address on sign-in, sign-up and reset requests. */
  AUTH_ACCOUNT_RATE_LIMIT: z.coerce.number().int().positive().default(10),
  /** Require a verified e-mail before sign-in. */
  REQUIRE_EMAIL_VERIFICATION: z.stringbool().default(true),
});

export type Env = z.infer<typeof envSchema>;

function loadEnv(): Env {
  const parsed = envSchema.safeParse(process.env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`).join("\n");
    console.error(`Tauline cannot start: bad configuration\n${lines}`);
    process.exit(1);
  }
  return parsed.data;
}

export const env = loadEnv();
