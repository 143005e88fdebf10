import { z } from "zod";

/** Stable error codes every API error carries. */
export const errorCodes = [
  "validation_failed",
  "unauthenticated",
  "forbidden",
  "not_found",
  "conflict",
  "unprocessable",
  "payload_too_large",
  "rate_limited",
  "unavailable",
  "internal",
] as const;
export type ErrorCode = (typeof errorCodes)[number];

/** One shape for every API error: `{ error: { code, message, details?, requestId? } }`. */
export const apiErrorSchema = z.object({
  error: z.object({
    code: z.string(),
    message: z.string(),
    /** Field path → messages, for validation failures. */
    details: z.record(z.string(), z.array(z.string())).optional(),
    requestId: z.string().optional(),
  }),
});
export type ApiErrorBody = z.infer<typeof apiErrorSchema>;
