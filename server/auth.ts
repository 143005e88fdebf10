import { betterAuth } from "better-auth";
import { drizzleAdapter } from "better-auth/adapters/drizzle";
import { APIError, createAuthMiddleware } from "better-auth/api";
import { admin } from "better-auth/plugins";
import { db } from "./db/client";
import * as schema from "./db/schema";
import { env } from "./env";
import { isCommonPassword } from "./lib/password-policy";
import { PgRateLimitStore } from "./lib/pg-rate-limit-store";
import { sendMail } from "./mail/send";

const PASSWORD_PATHS = new Set(["/sign-up/email", "/reset-password", "/change-password"]);

// Per-account limit on top of the per-IP one (server/middleware/rate-limit.ts): keyed by the e-mail address
// submitted, whether or not an account has it, so the answer tells nothing about which addresses exist.
const ACCOUNT_PATHS = new Set(["/sign-in/email", "/sign-up/email", "/request-password-reset", "/send-verification-email"]);
// Counted in PostgreSQL, so the limit holds across app servers.
const accountAttempts = new PgRateLimitStore("auth-account:");
accountAttempts.init({ windowMs: env.AUTH_RATE_WINDOW_S * 1000 });

export const auth = betterAuth({
  appName: "Tauline",
  baseURL: env.PUBLIC_URL,
  basePath: "/api/auth",
  secret: env.AUTH_SECRET,
  database: drizzleAdapter(db, {
    provider: "pg",
    schema: {
      user: schema.user,
      session: schema.session,
      account: schema.account,
      verification: schema.verification,
      rateLimit: schema.rateLimit,
    },
  }),
  emailAndPassword: {
    enabled: true,
    minPasswordLength: 12,
    maxPasswordLength: 128,
    requireEmailVerification: env.REQUIRE_EMAIL_VERIFICATION,
    revokeSessionsOnPasswordReset: true,
    async sendResetPassword({ user, url }) {
      await sendMail(
        user.email,
        "Reset your Tauline password",
        `Hello ${user.name},\n\nSomeone asked to reset the password of your Tauline account.\nIf it was you, open this link within one hour:\n\n${url}\n\nIf it was not you, ignore this message; your password stays as it is.\n\n— Tauline`,
      );
    },
  },
  emailVerification: {
    sendOnSignUp: true,
    sendOnSignIn: true,
    autoSignInAfterVerification: true,
    async sendVerificationEmail({ user, url }) {
      // Whatever page asked for the mail (sign-up, or a sign-in refused for an unverified address),
      // the link lands on the page that says the address is confirmed.
      const link = new URL(url);
      link.searchParams.set("callbackURL", "/verified");
      url = link.toString();
      await sendMail(
        user.email,
        "Confirm your e-mail address for Tauline",
        `Hello ${user.name},\n\nWelcome to Tauline. Confirm your e-mail address by opening this link:\n\n${url}\n\nThen sign in. A project admin adds you to your observing programme.\n\n— Tauline`,
      );
    },
  },
  session: { cookieCache: { enabled: false } },
  // Sign-in endpoints are rate-limited by the app (server/middleware/rate-limit.ts) so one rule covers them all.
  rateLimit: { enabled: false },
  advanced: { useSecureCookies: env.PUBLIC_URL.startsWith("https://") },
  hooks: {
    before: createAuthMiddleware(async (ctx) => {
      const body = (ctx.body ?? {}) as { email?: unknown; password?: unknown; newPassword?: unknown };
      if (ACCOUNT_PATHS.has(ctx.path) && typeof body.email === "string") {
        const { totalHits } = await accountAttempts.increment(`${ctx.path}:${body.email.trim().toLowerCase()}`);
        if (totalHits > env.AUTH_ACCOUNT_RATE_LIMIT) {
          throw new APIError("TOO_MANY_REQUESTS", {
            code: "TOO_MANY_ATTEMPTS",
            message: `Too many attempts for this account; wait ${env.AUTH_RATE_WINDOW_S} seconds and try again`,
          });
        }
      }
      if (!PASSWORD_PATHS.has(ctx.path)) return;
      const pw = typeof body.newPassword === "string" ? body.newPassword : body.password;
      if (typeof pw === "string" && isCommonPassword(pw)) {
        throw new APIError("BAD_REQUEST", {
          code: "PASSWORD_TOO_COMMON",
          message: "This password is on a list of commonly used passwords; choose another",
        });
      }
    }),
  },
  plugins: [admin({ defaultRole: "user", adminRoles: ["admin"] })],
});

export type AuthSession = typeof auth.$Infer.Session;
