import { apiErrorSchema } from "@shared/errors";

/** Any non-2xx answer from the Tauline API. `fields` maps a field path to its messages. */
export class ApiError extends Error {
  readonly status: number;
  readonly code: string;
  readonly fields: Record<string, string[]>;
  readonly requestId?: string;

  constructor(status: number, code: string, message: string, fields: Record<string, string[]> = {}, requestId?: string) {
    super(message);
    this.name = "ApiError";
    this.status = status;
    this.code = code;
    this.fields = fields;
    this.requestId = requestId;
  }
}

const fallbackMessages: Record<number, string> = {
  400: "The request was not accepted. Check the fields and try again.",
  401: "Please sign in to continue.",
  403: "You do not have access to this. Ask a project curator or an administrator.",
  404: "We could not find that. It may have been removed, or the link is wrong.",
  409: "That conflicts with something that already exists.",
  413: "That is too large to send.",
  422: "The request could not be processed as given.",
  429: "Too many attempts. Wait a minute and try again.",
};

async function request<T>(method: string, path: string, body?: unknown, signal?: AbortSignal): Promise<T> {
  let res: Response;
  try {
    res = await fetch(path, {
      method,
      credentials: "same-origin",
      headers: body === undefined ? { Accept: "application/json" } : { Accept: "application/json", "Content-Type": "application/json" },
      body: body === undefined ? undefined : JSON.stringify(body),
      signal,
    });
  } catch (err) {
    if ((err as Error).name === "AbortError") throw err;
    throw new ApiError(0, "network", "Tauline's server could not be reached. Check your connection and try again.");
  }
  if (res.status === 204) return undefined as T;
  const text = await res.text();
  let json: unknown = undefined;
  try {
    json = text ? JSON.parse(text) : undefined;
  } catch {
    json = undefined;
  }
  if (!res.ok) {
    const parsed = apiErrorSchema.safeParse(json);
    if (parsed.success) {
      const e = parsed.data.error;
      throw new ApiError(res.status, e.code, e.message, e.details ?? {}, e.requestId);
    }
    const message = fallbackMessages[res.status] ?? `The server answered ${res.status}. Try again in a moment.`;
    throw new ApiError(res.status, res.status >= 500 ? "internal" : "http_error", message);
  }
  return json as T;
}

export const api = {
  get: <T>(path: string, signal?: AbortSignal) => request<T>("GET", path, undefined, signal),
  post: <T>(path: string, body?: unknown) => request<T>("POST", path, body ?? {}),
  patch: <T>(path: string, body: unknown) => request<T>("PATCH", path, body),
  delete: <T = void>(path: string) => request<T>("DELETE", path),
};

/** Build a query string, leaving out empty values. */
export function withQuery(path: string, params: Record<string, string | undefined | null>): string {
  const s = new URLSearchParams();
  for (const [k, v] of Object.entries(params)) if (v) s.set(k, v);
  const qs = s.toString();
  return qs ? `${path}?${qs}` : path;
}

/** A message fit to show a person, whatever was thrown. */
export function getErrorMessage(error: unknown): string {
  if (error instanceof ApiError) {
    return error.requestId && error.status >= 500 ? `${error.message} (ref: ${error.requestId})` : error.message;
  }
  if (error instanceof Error && error.message) return error.message;
  if (typeof error === "string") return error;
  return "Something went wrong. Try again, and tell an administrator if it keeps happening.";
}
