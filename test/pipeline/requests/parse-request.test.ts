import { describe, expect, it } from "vitest";
import { z } from "zod";
import { parseOrThrow } from "../../../pipeline/requests/parse-request.js";
import { ClientError } from "../../../pipeline/requests/client-error.js";

const schema = z.object({ drops: z.object({ radiusUm: z.number().min(0.5).max(3000) }).strict() }).strict();

function errorOf(run: () => unknown): ClientError {
  try {
    run();
  } catch (error) {
    if (error instanceof ClientError) return error;
    throw error;
  }
  throw new Error("no error thrown");
}

describe("parseOrThrow", () => {
  it("names the field and its range", () => {
    const e = errorOf(() => parseOrThrow(schema, { drops: { radiusUm: -1 } }, "body"));
    expect(e.details).toMatchObject({ field: "drops.radiusUm", allowed: "a finite number >= 0.5 and <= 3000" });
    expect(e.message).toMatch(/^body field 'drops\.radiusUm' is invalid \(.*; sent -1\): allowed is a finite number >= 0\.5 and <= 3000$/);
  });

  it("with a prefix, names the field from the request's root: the value's range is still read at its own place", () => {
    const e = errorOf(() => parseOrThrow(schema, { drops: { radiusUm: -1 } }, "body", ["body"]));
    expect(e.details).toMatchObject({ field: "body.drops.radiusUm", allowed: "a finite number >= 0.5 and <= 3000" });
    expect(e.message).toMatch(/^body field 'body\.drops\.radiusUm' is invalid \(.*; sent -1\)/);
  });

  it("with a prefix: an unknown field and a fault of the whole value", () => {
    const unknown = errorOf(() => parseOrThrow(schema, { drops: { radiusUm: 1, colour: "red" } }, "body", ["query"]));
    expect(unknown.details.field).toBe("query.drops.colour");
    expect(unknown.message).toBe("body field 'query.drops.colour' is not known; allowed here are the fields radiusUm");
    const whole = errorOf(() => parseOrThrow(schema, 7, "body", ["body"]));
    expect(whole.details.field).toBe("body");
    expect(whole.message).toMatch(/^body field 'body' is invalid/);
    const root = errorOf(() => parseOrThrow(schema, 7, "body"));
    expect(root.details.field).toBeUndefined();
    expect(root.message).toMatch(/^body field '\(root\)' is invalid/);
  });
});
