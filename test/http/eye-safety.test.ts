// The eye-safety caution is the first thing a user meets wherever they start: near the top of the README and the
// page, in the OpenAPI document's info, above the routes in /docs, and in the CLI's help (which runs the built dist/).
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { execFileSync } from "node:child_process";
import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import request from "supertest";
import type { FastifyInstance } from "fastify";
import { buildApp } from "../../http/app.js";
import { EYE_SAFETY_CAUTION } from "../../pipeline/eye-safety.js";

const repoFile = (path: string) => readFileSync(fileURLToPath(new URL(`../../${path}`, import.meta.url)), "utf8");
/** The caution's words, whatever the line breaks and markup around them. */
const words = (text: string) => text.replace(/<[^>]+>|\*\*/g, "").replace(/\s+/g, " ");
const CORE = "Never look at the sun, with bare eyes or through a camera, viewfinder, binoculars or telescope";

let app: FastifyInstance;
beforeAll(async () => {
  app = await buildApp();
  await app.ready();
});
afterAll(async () => app.close());

describe("eye-safety caution", () => {
  it("README: right after the opening paragraph and the two commands, before any section", () => {
    const readme = repoFile("README.md");
    const [, opening, commands, afterCommands] = readme.match(/^# antisolar\n\n([^\n]+(?:\n[^\n]+)*)\n\n```sh\n([\s\S]*?)```\n\n([\s\S]*)$/)!;
    expect(opening.length).toBeGreaterThan(0);
    expect(commands.trim().split("\n")).toHaveLength(2);
    const nextParagraph = afterCommands.split("\n\n")[0];
    expect(words(nextParagraph)).toBe(EYE_SAFETY_CAUTION);
    expect(afterCommands.indexOf(CORE.slice(0, 30))).toBeLessThan(afterCommands.indexOf("\n## "));
  });

  it("the page: under the masthead, before the controls", async () => {
    const page = (await request(app.server).get("/")).text;
    const caution = page.indexOf('id="eye-safety"');
    expect(caution).toBeGreaterThan(page.indexOf("</header>"));
    expect(caution).toBeLessThan(page.indexOf('<form id="controls"'));
    expect(words(page.slice(caution))).toContain(CORE);
  });

  it("/openapi.json: in info.description", async () => {
    const res = await request(app.server).get("/openapi.json");
    expect(res.body.info.description).toContain(EYE_SAFETY_CAUTION);
  });

  it("/docs: once, above the routes", async () => {
    const docs = (await request(app.server).get("/docs")).text;
    const at = docs.indexOf(CORE);
    expect(at).toBeGreaterThan(0);
    expect(docs.indexOf(CORE, at + 1)).toBe(-1);
    expect(at).toBeLessThan(docs.indexOf("/v1/profile"));
  });

  it("the CLI's help: before the commands", () => {
    const cli = fileURLToPath(new URL("../../dist/cli/antisolar.js", import.meta.url));
    const help = execFileSync(process.execPath, [cli, "help"], { encoding: "utf8" });
    expect(help).toContain(EYE_SAFETY_CAUTION);
    expect(help.indexOf(EYE_SAFETY_CAUTION)).toBeLessThan(help.indexOf("antisolar bake"));
  });
});
