import type { FieldValues, Path, UseFormSetError } from "react-hook-form";
import { ApiError, getErrorMessage } from "./api-client";

/**
 * Copy the server's per-field messages into react-hook-form. Returns the message to show
 * above the form for whatever could not be placed on a field (or null when all were).
 */
export function applyServerErrors<T extends FieldValues>(error: unknown, setError: UseFormSetError<T>, fields: readonly string[]): string | null {
  if (error instanceof ApiError && Object.keys(error.fields).length > 0) {
    const loose: string[] = [];
    for (const [path, messages] of Object.entries(error.fields)) {
      const name = path.split(".")[0];
      if (fields.includes(name)) setError(name as Path<T>, { type: "server", message: messages.join(" ") });
      else loose.push(...messages);
    }
    return loose.length ? loose.join(" ") : error.message;
  }
  return getErrorMessage(error);
}
