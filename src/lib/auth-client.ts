import { createAuthClient } from "better-auth/react";

/** better-auth client; the API mounts it at /api/auth on the same origin. */
export const authClient = createAuthClient({ baseURL: window.location.origin });

export { authErrorMessage } from "./auth-errors";
