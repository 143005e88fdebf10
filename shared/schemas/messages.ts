import { z } from "zod";

/**
 * Plain words for zod's generic checks, for every schema in Tauline (server and browser): "Must be a number, not
 * “lots”" rather than "Invalid input: expected number, received string". A message a schema gives itself still
 * wins; anything not covered here keeps zod's own wording. Imported once by every entry point (server app,
 * worker, browser, command line) and by shared/schemas/common.ts.
 */
const kinds: Record<string, string> = {
  number: "a number",
  int: "a whole number",
  string: "text",
  boolean: "true or false",
  array: "a list",
  object: "an object",
  date: "a date",
  bigint: "a whole number",
};

const shown = (x: unknown) => {
  if (typeof x === "string") return `“${x.length > 24 ? `${x.slice(0, 24)}…` : x}”`;
  if (x === null) return "empty";
  if (Array.isArray(x)) return "a list";
  if (typeof x === "object") return "an object";
  return String(x);
};

export function plainMessage(iss: z.core.$ZodRawIssue): string | undefined {
  switch (iss.code) {
    case "invalid_type": {
      if (iss.input === undefined) return "Required";
      const want = kinds[iss.expected];
      return want ? `Must be ${want}, not ${shown(iss.input)}` : undefined;
    }
    case "too_small": {
      const min = Number(iss.minimum);
      if (iss.origin === "number" || iss.origin === "int") return iss.inclusive ? `Must be at least ${min}` : `Must be greater than ${min}`;
      if (iss.origin === "string") return min <= 1 ? "Must not be empty" : `Must be at least ${min} characters`;
      if (iss.origin === "array" || iss.origin === "set") return `Must have at least ${min} item${min === 1 ? "" : "s"}`;
      return undefined;
    }
    case "too_big": {
      const max = Number(iss.maximum);
      if (iss.origin === "number" || iss.origin === "int") return iss.inclusive ? `Must be at most ${max}` : `Must be less than ${max}`;
      if (iss.origin === "string") return `Must be at most ${max} characters`;
      if (iss.origin === "array" || iss.origin === "set") return `Must have at most ${max} item${max === 1 ? "" : "s"}`;
      return undefined;
    }
    case "invalid_value":
      return iss.values.length === 1 ? `Must be ${shown(iss.values[0])}` : `Must be one of ${iss.values.map((v) => shown(v)).join(", ")}`;
    default:
      return undefined;
  }
}

z.config({ customError: plainMessage });
