// Request bodies are checked by one flat pass over the text before anything walks them recursively: a body nested
// 100,000 deep, or a million-member object, is refused here with a 400 naming the place and the limit, never
// handed to code whose recursion or cost grows with the nesting or the size. What passes is I-JSON (Bray, RFC 7493,
// 2015): UTF-8 without a byte-order mark (RFC 8259 §8.1), no lone surrogates or noncharacters (RFC 7493 §2.1),
// numbers inside the range of an IEEE 754 double (§2.2), unique member names (§2.3). Then JSON.parse builds it.

import { ClientError } from "./client-error.js";
import { previewText } from "./preview.js";

export interface JsonBodyLimits {
  /** Deepest nesting of objects and arrays; the body's own object is level 1. */
  maxDepth: number;
  /** Most members of one object. */
  maxMembers: number;
  /** Most items of one array. */
  maxItems: number;
  /** Longest string value, in UTF-16 code units after unescaping. */
  maxStringChars: number;
  /** Longest member name, in UTF-16 code units after unescaping. */
  maxKeyChars: number;
}

/**
 * Our choices, each a wide margin above what any request schema accepts (test/pipeline/requests/json-body.test.ts
 * checks the margin against every route's schema): the deepest schema is 6 levels inside a job, the longest array
 * 5,000 items (a spectrum), the widest object a dozen fields, the longest string an enum name.
 */
export const JSON_BODY_LIMITS: Readonly<JsonBodyLimits> = Object.freeze({
  maxDepth: 32,
  maxMembers: 256,
  maxItems: 10_000,
  maxStringChars: 1024,
  maxKeyChars: 128,
});

interface Frame {
  isObject: boolean;
  /** Items of an array, members of an object, so far. */
  count: number;
  /** In an object: the next string is a member name. */
  expectKey: boolean;
  /** In an object: the name of the member being read, for error paths. */
  key: string;
  keys?: Set<string>;
}

const TOP_LEVEL_KINDS: Record<string, string> = { "[": "an array", '"': "a string", t: "a boolean", f: "a boolean", n: "null" };

/** Decodes, checks and parses a JSON request body; throws a ClientError (400) naming the place and the limit. */
export function parseJsonBody(raw: Uint8Array | string, limits: JsonBodyLimits = JSON_BODY_LIMITS): Record<string, unknown> {
  const text = typeof raw === "string" ? raw : decodeUtf8(raw);
  checkJsonText(text, limits);
  try {
    return JSON.parse(text) as Record<string, unknown>;
  } catch (error) {
    // V8's message quotes a window of the text around the fault; it is still cut to a preview.
    throw invalidJson(`the body is not valid JSON: ${previewText((error as Error).message, 160)}`);
  }
}

const utf8 = new TextDecoder("utf-8", { fatal: true, ignoreBOM: true });

function decodeUtf8(bytes: Uint8Array): string {
  try {
    return utf8.decode(bytes);
  } catch {
    throw invalidJson("the body is not valid UTF-8; JSON sent over a network must be UTF-8 (RFC 8259 §8.1)", "UTF-8 text");
  }
}

function invalidJson(message: string, allowed = "JSON (RFC 8259)"): ClientError {
  return new ClientError("invalid-json", message, { field: "body", allowed });
}

/** The single pass: throws at the first limit or I-JSON rule broken; leaves the grammar to JSON.parse. */
export function checkJsonText(text: string, limits: JsonBodyLimits = JSON_BODY_LIMITS): void {
  if (text.charCodeAt(0) === 0xfeff) {
    throw invalidJson("the body starts with a byte-order mark (U+FEFF); JSON sent over a network must not (RFC 8259 §8.1)");
  }
  let i = skipSpace(text, 0);
  if (i >= text.length) throw invalidJson("the body is empty but says it is JSON; send {} for all defaults");
  if (text[i] !== "{") {
    const kind = TOP_LEVEL_KINDS[text[i]] ?? (/[-0-9]/.test(text[i]) ? "a number" : undefined);
    if (!kind) throw invalidJson(`the body is not valid JSON: unexpected ${describeChar(text, i)} at position ${i}`);
    throw new ClientError("invalid-request", `the body must be a JSON object; it is ${kind}`, { field: "(root)", allowed: "a JSON object" });
  }
  const frames: Frame[] = [];
  const refuse = (what: string, allowed: string, extraKey?: string) => {
    const field = pathOf(frames, extraKey);
    throw new ClientError("invalid-request", `body field '${field}' ${what}: allowed is ${allowed}`, { field, allowed });
  };
  /** A value starts in the innermost container: arrays count it as an item. */
  const valueStarts = () => {
    const top = frames[frames.length - 1];
    if (top && !top.isObject && ++top.count > limits.maxItems) refuse(`has more than ${limits.maxItems} items`, `at most ${limits.maxItems} items in an array`);
  };
  while (i < text.length) {
    const c = text[i];
    const top = frames[frames.length - 1];
    if (c === "{" || c === "[") {
      valueStarts();
      if (frames.length >= limits.maxDepth) refuse(`nests deeper than ${limits.maxDepth} levels`, `at most ${limits.maxDepth} levels of objects and arrays`);
      frames.push({ isObject: c === "{", count: 0, expectKey: c === "{", key: "" });
      i++;
    } else if (c === "}" || c === "]") {
      if (!top || top.isObject !== (c === "}")) break; // a mismatched bracket: JSON.parse reports it
      frames.pop();
      i++;
    } else if (c === '"') {
      const end = stringEnd(text, i);
      if (end < 0) break; // unterminated: JSON.parse reports it
      const isKey = top !== undefined && top.isObject && top.expectKey;
      if (!isKey) valueStarts();
      const max = isKey ? limits.maxKeyChars : limits.maxStringChars;
      // A string's unescaped length is at least a sixth of its escaped length (\uXXXX is six characters for one).
      if (end - i - 1 > 6 * max) refuse(isKey ? "has a member name too long" : "is too long", isKey ? `names of at most ${max} characters` : `strings of at most ${max} characters`);
      const value = unescapeString(text, i, end);
      if (value.length > max) {
        if (isKey) refuse(`has a member name of ${value.length} characters`, `names of at most ${max} characters`);
        else refuse(`is a string of ${value.length} characters`, `strings of at most ${max} characters`);
      }
      const bad = badCodePoint(value);
      if (bad) {
        throw invalidJson(`body field '${pathOf(frames, isKey ? value : undefined)}' holds ${bad}; JSON text must be Unicode scalar values (RFC 7493 §2.1)`, "Unicode text without lone surrogates or noncharacters");
      }
      if (isKey) {
        // JSON.parse keeps "__proto__" as a plain member, but the first object spread or record copy (zod's
        // z.record among them) turns it into the prototype: a job's body {"__proto__": {...}} was dropped unchecked.
        if (value === "__proto__") refuse("is named __proto__", "member names other than __proto__", value);
        top.keys ??= new Set();
        if (top.keys.has(value)) refuse("appears twice in one object", "each member name once per object (RFC 7493 §2.3)", value);
        if (++top.count > limits.maxMembers) refuse(`is one member more than ${limits.maxMembers}`, `at most ${limits.maxMembers} members in an object`, value);
        top.keys.add(value);
        top.key = value;
        top.expectKey = false;
      }
      i = end + 1;
    } else if (c === "-" || (c >= "0" && c <= "9")) {
      let j = i + 1;
      while (j < text.length && isNumberChar(text.charCodeAt(j))) j++;
      valueStarts();
      const number = Number(text.slice(i, j));
      if (Number.isNaN(number)) break; // not a JSON number: JSON.parse reports it
      if (!Number.isFinite(number)) refuse(`is a number beyond the range of a double (${previewText(text.slice(i, j), 24)})`, "numbers of magnitude below 1.8e308 (RFC 7493 §2.2)");
      i = j;
    } else if (c === "t" || c === "f" || c === "n") {
      valueStarts();
      i++;
      while (i < text.length && text[i] >= "a" && text[i] <= "z") i++;
    } else if (c === ",") {
      if (top?.isObject) top.expectKey = true;
      i++;
    } else if (c === ":" || c === " " || c === "\t" || c === "\n" || c === "\r") {
      i++;
    } else {
      throw invalidJson(`the body is not valid JSON: unexpected ${describeChar(text, i)} at position ${i}`);
    }
  }
}

/** Digits, sign, point and exponent: what a JSON number is made of (RFC 8259 §6). */
function isNumberChar(c: number): boolean {
  return (c >= 0x30 && c <= 0x39) || c === 0x2e || c === 0x2b || c === 0x2d || c === 0x65 || c === 0x45;
}

function skipSpace(text: string, i: number): number {
  while (i < text.length && (text[i] === " " || text[i] === "\t" || text[i] === "\n" || text[i] === "\r")) i++;
  return i;
}

/** Index of the closing quote of the string opening at `start`, or -1. */
function stringEnd(text: string, start: number): number {
  for (let j = start + 1; j < text.length; j++) {
    const c = text.charCodeAt(j);
    if (c === 0x5c) j++;
    else if (c === 0x22) return j;
  }
  return -1;
}

function unescapeString(text: string, start: number, end: number): string {
  const inner = text.slice(start + 1, end);
  if (!inner.includes("\\")) return inner;
  try {
    return JSON.parse(text.slice(start, end + 1)) as string;
  } catch {
    throw invalidJson(`the body is not valid JSON: a bad escape in the string at position ${start}`);
  }
}

/** A lone surrogate or a noncharacter (Unicode 15.0 §23.7), described; undefined when the text has neither. */
function badCodePoint(text: string): string | undefined {
  if (!/[\uD800-\uDFFF\uFDD0-\uFDEF\uFFFE\uFFFF]/.test(text)) return undefined;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c >= 0xd800 && c <= 0xdbff) {
      const low = text.charCodeAt(i + 1);
      if (!(low >= 0xdc00 && low <= 0xdfff)) return `a lone surrogate U+${hex(c)}`;
      const codePoint = 0x10000 + ((c - 0xd800) << 10) + (low - 0xdc00);
      if ((codePoint & 0xfffe) === 0xfffe) return `the noncharacter U+${hex(codePoint)}`;
      i++;
    } else if (c >= 0xdc00 && c <= 0xdfff) return `a lone surrogate U+${hex(c)}`;
    else if ((c >= 0xfdd0 && c <= 0xfdef) || c === 0xfffe || c === 0xffff) return `the noncharacter U+${hex(c)}`;
  }
  return undefined;
}

const hex = (n: number) => n.toString(16).toUpperCase().padStart(4, "0");

function describeChar(text: string, i: number): string {
  const c = text.codePointAt(i) ?? 0;
  return c >= 0x21 && c <= 0x7e ? `'${text[i]}'` : `U+${hex(c)}`;
}

/** Where the scanner is, as parse-request.ts names fields: drops.radii[3]; names are cut to a preview. */
function pathOf(frames: Frame[], extraKey?: string): string {
  let out = "";
  const name = (key: string) => previewText(key, 40);
  for (let f = 0; f < frames.length; f++) {
    const frame = frames[f];
    const last = f === frames.length - 1;
    if (frame.isObject) {
      const key = last && extraKey !== undefined ? extraKey : frame.expectKey && last ? undefined : frame.key;
      if (key !== undefined) out += out ? `.${name(key)}` : name(key);
    } else if (frame.count > 0) out += `[${frame.count - 1}]`;
  }
  return previewText(out, 160) || "(root)";
}
