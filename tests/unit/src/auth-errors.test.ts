import { describe, expect, test } from "vitest";
import { authErrorMessage } from "../../../src/lib/auth-errors";

describe("authErrorMessage", () => {
  test("a 429 passes on the server's own sentence: which limit, and how long to wait", () => {
    // Per-address limit (server/middleware/rate-limit.ts): { error: { message } } in the body.
    expect(authErrorMessage({ status: 429, statusText: "Too Many Requests", error: { message: "Too many attempts; wait 60 seconds and try again" } })).toBe(
      "Too many attempts; wait 60 seconds and try again.",
    );
    // Per-account limit (server/auth.ts): better-auth puts the message at the top.
    expect(authErrorMessage({ status: 429, message: "Too many attempts for this account; wait 60 seconds and try again" })).toBe(
      "Too many attempts for this account; wait 60 seconds and try again.",
    );
  });

  test("a bare 429 (no sentence from the server) still says what to do", () => {
    expect(authErrorMessage({ status: 429, statusText: "Too Many Requests", message: "Too Many Requests" })).toBe("Too many attempts. Wait a minute and try again.");
  });

  test("wrong password and unverified e-mail get their own sentences", () => {
    expect(authErrorMessage({ status: 401, code: "INVALID_EMAIL_OR_PASSWORD" })).toMatch(/do not match/);
    expect(authErrorMessage({ status: 403, code: "EMAIL_NOT_VERIFIED" })).toMatch(/not verified/);
  });
});
