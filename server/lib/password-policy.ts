import { dictionary } from "@zxcvbn-ts/language-common";

// ~49,000 frequently used passwords, shipped with the app from an npm dictionary package.
const common = new Set((dictionary["passwords-common"] as string[]).map((p) => p.toLowerCase()));

/** True when the password appears in the shipped list of common passwords (case-insensitive). */
export function isCommonPassword(password: string): boolean {
  return common.has(password.toLowerCase());
}
