import { describe, expect, test } from "vitest";
import { z } from "zod";
import "../../../../shared/schemas/messages";

const first = (schema: z.ZodType, input: unknown) => {
  const r = schema.safeParse(input);
  if (r.success) throw new Error("expected a failure");
  return r.error.issues[0]!.message;
};

// What people read when a generic check fails (common practice in form wording; our own words).
describe("plain messages for zod's generic checks", () => {
  test("types name what was wanted and what came", () => {
    expect(first(z.object({ n: z.number() }), { n: "lots" })).toBe("Must be a number, not “lots”");
    expect(first(z.object({ n: z.number() }), {})).toBe("Required");
    expect(first(z.string(), 4)).toBe("Must be text, not 4");
    expect(first(z.array(z.number()), null)).toBe("Must be a list, not empty");
  });
  test("bounds say the limit in words", () => {
    expect(first(z.number().positive(), 0)).toBe("Must be greater than 0");
    expect(first(z.number().min(1), 0)).toBe("Must be at least 1");
    expect(first(z.number().max(30), 31)).toBe("Must be at most 30");
    expect(first(z.string().min(1), "")).toBe("Must not be empty");
    expect(first(z.string().max(3), "abcd")).toBe("Must be at most 3 characters");
    expect(first(z.array(z.number()).length(12), [1])).toBe("Must have at least 12 items");
  });
  test("choices are listed", () => {
    expect(first(z.enum(["power", "log", "drag"]), "cubic")).toBe("Must be one of “power”, “log”, “drag”");
    expect(first(z.literal(1), 2)).toBe("Must be 1");
  });
  test("a schema's own message still wins", () => {
    expect(first(z.string().min(1, "Give the platform a name"), "")).toBe("Give the platform a name");
  });
});
