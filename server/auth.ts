import { betterAuth } from "better-auth";
import { drizzleAdapter } from "better-auth/adapters/drizzle";
import { admin } from "better-auth/plugins";
import { db } from "./db/client";
import * as schema from "./db/schema";
import { env } from "./env";
import { sendMail } from "./mail/send";

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
  plugins: [admin({ defaultRole: "user", adminRoles: ["admin"] })],
});

export type AuthSession = typeof auth.$Infer.Session;
