import { pino } from "pino";
import { env } from "../env";

export const logger = pino({
  level: env.NODE_ENV === "test" && env.LOG_LEVEL === "info" ? "warn" : env.LOG_LEVEL,
  redact: { paths: ["req.headers.cookie", "req.headers.authorization", "*.password", "*.newPassword"], remove: true },
});
