import type { ZodError } from "zod";
import type { ErrorCode } from "@shared/errors";

/** An expected failure with a message written for the user. Internal detail goes in `cause` (logged, never sent). */
export class AppError extends Error {
  constructor(
    public code: ErrorCode,
    message: string,
    public status: number,
    public details?: Record<string, string[]>,
    options?: { cause?: unknown },
  ) {
    super(message, options);
  }
}

export const notFound = (what: string) => new AppError("not_found", `${what} not found`, 404);
export const forbidden = (message = "You do not have permission to do this") => new AppError("forbidden", message, 403);
export const unauthenticated = () => new AppError("unauthenticated", "Sign in to continue", 401);
export const conflict = (message: string, details?: Record<string, string[]>) => new AppError("conflict", message, 409, details);

/** Turns a ZodError into field path → messages, with "body" for errors at the root. */
export function zodDetails(err: ZodError): Record<string, string[]> {
  const details: Record<string, string[]> = {};
  for (const issue of err.issues) {
    const key = issue.path.length ? issue.path.join(".") : "body";
    (details[key] ??= []).push(issue.message);
  }
  return details;
}
