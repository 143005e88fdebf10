/** What better-auth's client hands back for a refused call; a 429 from our own limiter carries `error.message`. */
type AuthErrorLike = { status?: number; code?: string; message?: string; statusText?: string; error?: { message?: string } } | null | undefined;

/** A server sentence with a closing full stop. */
const sentence = (s: string) => (/[.!?]$/.test(s) ? s : `${s}.`);

/** Turn a better-auth error into a sentence that says what to do. */
export function authErrorMessage(error: AuthErrorLike): string {
  if (!error) return "Something went wrong. Try again.";
  const code = (error.code ?? "").toUpperCase();
  if (code === "EMAIL_NOT_VERIFIED" || (error.status === 403 && /verif/i.test(error.message ?? ""))) {
    return "Your e-mail address is not verified yet. Open the link in the e-mail we sent you, then sign in.";
  }
  if (code === "INVALID_EMAIL_OR_PASSWORD" || error.status === 401) return "That e-mail and password do not match. Check both, or reset your password.";
  if (code === "USER_ALREADY_EXISTS" || code === "USER_ALREADY_EXISTS_USE_ANOTHER_EMAIL") {
    return "An account with this e-mail already exists. Sign in, or reset your password.";
  }
  if (code === "INVALID_TOKEN" || code === "TOKEN_EXPIRED") return "This reset link is invalid or has expired. Ask for a new one.";
  if (code === "PASSWORD_TOO_SHORT") return "Use at least 12 characters.";
  if (error.status === 429) {
    // The server says which limit was hit (this address, or this account) and how long to wait.
    const said = error.error?.message ?? (error.message && !/^too many requests$/i.test(error.message) ? error.message : undefined);
    return said ? sentence(said) : "Too many attempts. Wait a minute and try again.";
  }
  return error.message || error.statusText || "Something went wrong. Try again.";
}
