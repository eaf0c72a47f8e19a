// The body scanner: each limit just inside and just outside, each I-JSON rule (Bray, RFC 7493, 2015: §2.1 Unicode
// scalar values only, §2.2 numbers within an IEEE 754 double, §2.3 unique member names), RFC 8259 §8.1 (UTF-8, no
// byte-order mark on the wire), and agreement with JSON.parse on every body that passes.
import { describe, it, expect } from "vitest";
import fc from "fast-check";
import { parseJsonBody, JSON_BODY_LIMITS } from "../../../pipeline/requests/json-body.js";
import { ClientError } from "../../../pipeline/requests/client-error.js";
import { previewText, previewValue, PREVIEW_CHARS } from "../../../pipeline/requests/preview.js";

const SEED = process.env.PROPERTY_SEED === "random" ? undefined : Number(process.env.PROPERTY_SEED ?? 20261203);

function refusal(body: string | Uint8Array): ClientError {
  try {
    parseJsonBody(body);
  } catch (error) {
    expect(error).toBeInstanceOf(ClientError);
    return error as ClientError;
  }
  throw new Error(`accepted: ${previewText(String(body))}`);
}

const nested = (depth: number, open: string, close: string, inner = "1") => open.repeat(depth) + inner + close.repeat(depth);
const { maxDepth, maxMembers, maxItems, maxStringChars, maxKeyChars } = JSON_BODY_LIMITS;

describe("nesting", () => {
  it("refuses an array nested 100,000 deep inside the body without recursing, naming the place and the limit", () => {
    const error = refusal(`{"drops":${nested(100_000, "[", "]")}}`);
    expect(error.status).toBe(400);
    // drops is level 2, so the first array past the limit (level 33) starts at drops followed by 31 indices.
    expect(error.details.field).toBe(`drops${"[0]".repeat(maxDepth - 1)}`);
    expect(error.message).toContain(`deeper than ${maxDepth} levels`);
    expect(error.details.allowed).toBe(`at most ${maxDepth} levels of objects and arrays`);
  });

  it("takes exactly the stated depth, counting the body's own object as level 1, and refuses one more", () => {
    expect(parseJsonBody(`{"a":${nested(maxDepth - 1, "[", "]")}}`)).toBeTruthy();
    expect(refusal(`{"a":${nested(maxDepth, "[", "]")}}`).details.allowed).toContain(`${maxDepth} levels`);
    const objects = (depth: number) => `${'{"k":'.repeat(depth)}1${"}".repeat(depth)}`;
    expect(parseJsonBody(objects(maxDepth))).toBeTruthy();
    expect(refusal(objects(maxDepth + 1)).details.field).toBe(Array(maxDepth).fill("k").join("."));
  });

  it("counts mixed nesting of objects and arrays alike", () => {
    const mixed = (depth: number) => `{"a":${'[{"b":'.repeat(depth)}0${"}]".repeat(depth)}}`;
    // 1 + 2 × 15 = 31 levels, then 33.
    expect(parseJsonBody(mixed(15))).toBeTruthy();
    expect(refusal(mixed(16)).message).toContain(`deeper than ${maxDepth}`);
  });
});

describe("width and length", () => {
  const members = (n: number) => `{${Array.from({ length: n }, (_, i) => `"m${i}":${i}`).join(",")}}`;
  const items = (n: number) => `{"list":[${Array(n).fill(0).join(",")}]}`;

  it("takes an object of the stated width and refuses one member more, naming that member", () => {
    expect(Object.keys(parseJsonBody(members(maxMembers)))).toHaveLength(maxMembers);
    const error = refusal(members(maxMembers + 1));
    expect(error.details.field).toBe(`m${maxMembers}`);
    expect(error.details.allowed).toBe(`at most ${maxMembers} members in an object`);
  });

  it("takes an array of the stated length and refuses one item more, naming that item", () => {
    expect((parseJsonBody(items(maxItems)).list as number[]).length).toBe(maxItems);
    const error = refusal(items(maxItems + 1));
    expect(error.details.field).toBe(`list[${maxItems}]`);
    expect(error.details.allowed).toBe(`at most ${maxItems} items in an array`);
  });

  it("measures strings and names after unescaping, and refuses one character more", () => {
    expect(parseJsonBody(`{"s":"${"x".repeat(maxStringChars)}"}`).s).toHaveLength(maxStringChars);
    expect(parseJsonBody(`{"s":"${"\\u0041".repeat(maxStringChars)}"}`).s).toHaveLength(maxStringChars);
    expect(refusal(`{"s":"${"\\u0041".repeat(maxStringChars + 1)}"}`).details).toMatchObject({ field: "s", allowed: `strings of at most ${maxStringChars} characters` });
    expect(refusal(`{"list":[1,"${"x".repeat(10 * maxStringChars)}"]}`).details.field).toBe("list[1]");
    expect(parseJsonBody(`{"${"k".repeat(maxKeyChars)}":1}`)).toBeTruthy();
    const error = refusal(`{"${"k".repeat(2 ** 20)}":1}`);
    expect(error.details.allowed).toBe(`names of at most ${maxKeyChars} characters`);
    expect(error.message.length).toBeLessThan(400);
  });
});

describe("I-JSON rules", () => {
  it("refuses numbers beyond the range of a double, and takes the largest double", () => {
    for (const n of ["1e400", "-1e400", "1".repeat(2 ** 20), "1797693134862315800000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000"]) {
      expect(refusal(`{"sun":{"elevationDeg":${n}}}`).details).toMatchObject({ field: "sun.elevationDeg", allowed: expect.stringContaining("RFC 7493 §2.2") });
    }
    expect(parseJsonBody('{"x":1.7976931348623157e308}').x).toBe(Number.MAX_VALUE);
    expect(parseJsonBody('{"x":1e-400}').x).toBe(0); // underflow rounds to zero: a double, if an imprecise one
  });

  it("refuses a member name given twice, also when spelled with escapes, and takes it again in another object", () => {
    expect(refusal('{"a":1,"a":2}').details).toMatchObject({ field: "a", allowed: expect.stringContaining("RFC 7493 §2.3") });
    expect(refusal('{"b":{"a":1,"\\u0061":2}}').details.field).toBe("b.a");
    expect(parseJsonBody('{"a":{"a":1},"b":{"a":2}}')).toEqual({ a: { a: 1 }, b: { a: 2 } });
  });

  it("refuses the member name __proto__, however spelled, at any depth", () => {
    expect(refusal('{"__proto__":{}}').details.field).toBe("__proto__");
    expect(refusal('{"body":{"\\u005f_proto__":{"drops":1}}}').details).toMatchObject({ field: "body.__proto__", allowed: "member names other than __proto__" });
    expect(parseJsonBody('{"constructor":{"prototype":1}}')).toEqual({ constructor: { prototype: 1 } });
  });

  it("refuses lone surrogates and noncharacters in values and names, and takes a proper pair", () => {
    for (const s of ["\\ud800", "x\\udc00", "\\udbff\\u0041", "\\ufdd0", "\\uffff", "\\ud83f\\udfff"]) {
      expect(refusal(`{"s":"${s}"}`).code).toBe("invalid-json");
      expect(refusal(`{"${s}":1}`).message).toContain("RFC 7493 §2.1");
    }
    expect(parseJsonBody('{"s":"\\ud83c\\udf08"}').s).toBe("🌈");
  });

  it("refuses a byte-order mark and bytes that are not UTF-8 (RFC 8259 §8.1)", () => {
    expect(refusal(Buffer.from("\ufeff{}", "utf8")).message).toContain("byte-order mark");
    // Invalid byte, overlong "/" (RFC 3629 §3), an encoded surrogate U+D800, a truncated sequence.
    for (const bytes of [[0xff], [0xc0, 0xaf], [0xed, 0xa0, 0x80], [0xe2, 0x82]]) {
      const body = Buffer.concat([Buffer.from('{"s":"'), Buffer.from(bytes), Buffer.from('"}')]);
      expect(refusal(body).message).toContain("not valid UTF-8");
    }
  });
});

describe("bodies that are not an object, or not JSON", () => {
  it("refuses valid JSON that is not an object with a 400 saying what it is", () => {
    for (const [body, kind] of [['"x"', "a string"], ["12", "a number"], ["-1", "a number"], ["null", "null"], ["[]", "an array"], ["true", "a boolean"], [nested(100_000, "[", "]"), "an array"]]) {
      const error = refusal(body);
      expect(error.details).toMatchObject({ field: "(root)", allowed: "a JSON object" });
      expect(error.message).toBe(`the body must be a JSON object; it is ${kind}`);
    }
  });

  it("refuses empty bodies and broken JSON as invalid-json, with a bounded message", () => {
    expect(refusal("").code).toBe("invalid-json");
    expect(refusal("  \n").message).toContain("send {} for all defaults");
    for (const body of ['{"a":1} x', '{"a":', '{"a":1]', '{"a":01}', '{"a":-}', '{"a":nul}', `{"a":"${"x".repeat(500)}`, '{"a":1.}', `{"a":"\\q"}`, "{'a':1}"]) {
      const error = refusal(body);
      expect(error.code).toBe("invalid-json");
      expect(error.message.length).toBeLessThan(300);
    }
  });
});

describe("agreement with JSON.parse", () => {
  it("parses every object within the limits exactly as JSON.parse does", () => {
    fc.assert(
      fc.property(fc.dictionary(fc.string({ maxLength: 20, unit: "grapheme" }), fc.jsonValue({ maxDepth: 6, stringUnit: "grapheme" }), { maxKeys: 8 }), (value) => {
        const text = JSON.stringify(value);
        expect(parseJsonBody(Buffer.from(text, "utf8"))).toEqual(JSON.parse(text));
      }),
      { seed: SEED, numRuns: 300 },
    );
  });
});

describe("previews of client input", () => {
  it("cut long text to the stated length without splitting a surrogate pair", () => {
    expect(previewText("short")).toBe("short");
    const cut = previewText("🌈".repeat(100));
    expect(cut.length).toBeLessThan(PREVIEW_CHARS + 20);
    expect(cut).toMatch(/… \(200 chars\)$/);
    expect(/[\ud800-\udbff](?![\udc00-\udfff])/.test(cut)).toBe(false);
  });

  it("render any value, however deep or wide, in bounded length and without recursing into all of it", () => {
    let deep: unknown = 1;
    for (let i = 0; i < 200_000; i++) deep = [deep];
    expect(previewValue(deep).length).toBeLessThanOrEqual(PREVIEW_CHARS + 1);
    expect(previewValue(Array(1e6).fill("x".repeat(1000))).length).toBeLessThanOrEqual(PREVIEW_CHARS + 1);
    expect(previewValue({ a: [1, 2], b: "c" })).toBe('{"a":[1,2],"b":"c"}');
    expect(previewValue(undefined)).toBe("undefined");
  });
});
