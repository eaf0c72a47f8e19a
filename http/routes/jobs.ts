// Background renders: POST /v1/jobs queues a render without the synchronous cost limit; GET polls it, /events
// streams its progress (server-sent events), /result returns the file, DELETE cancels it. GET /readyz lives here
// because readiness is the job system's: Redis reachable when configured.

import type { FastifyReply, FastifyRequest } from "fastify";
import { defineRoute, type RouteSpec } from "../route-spec.js";
import { jobRequestSchema, type JobRequest } from "../../schemas/jobs.js";
import { parseOrThrow } from "../../pipeline/requests/parse-request.js";
import { ClientError } from "../../pipeline/requests/client-error.js";
import { sendOutput } from "../send-output.js";
import type { JobSystem } from "../../pipeline/jobs/job-system.js";
import { JobError } from "../../pipeline/jobs/job-errors.js";
import { jobHash, terminalStates, type JobRecord } from "../../pipeline/jobs/job-types.js";
import type { JobResponse } from "../../schemas/responses/job-response.js";
import type { ReadyResponse } from "../../schemas/responses/service-response.js";

/** Comment lines keep idle event streams open through proxies that close quiet connections (WHATWG HTML Living Standard §9.2.7, authoring notes: a comment line every 15 s or so). */
const HEARTBEAT_MS = 15_000;
/** Re-reads the job this often while streaming, in case a change notice was missed. */
const POLL_MS = 1_000;

function jobView(record: JobRecord): JobResponse {
  const self = `/v1/jobs/${record.id}`;
  const { id, endpoint, state, progress, reused, hash, createdAt, startedAt, finishedAt, attempts, error } = record;
  return {
    id, endpoint, state, progress, reused, hash, createdAt, startedAt, finishedAt, attempts, error,
    links: { self, events: `${self}/events`, result: `${self}/result` },
  };
}

/** Checks a part of the job against the endpoint's schema; a fault is reported at its place in the job body. */
function parseNested(schema: Parameters<typeof parseOrThrow>[0], value: unknown, part: "body" | "query"): unknown {
  return parseOrThrow(schema, value, "body", [part]);
}

function idOf(request: FastifyRequest): string {
  return (request.params as { id: string }).id;
}

export function jobRoutes(jobs: JobSystem): RouteSpec[] {
  const { backend, registry } = jobs;
  const endpoints = Object.keys(registry);
  const requestSchema = jobRequestSchema(endpoints);

  async function find(id: string): Promise<JobRecord> {
    const record = await backend.get(id);
    if (!record) throw new ClientError("not-found", `no job '${id}': it never existed or its record has expired`, { field: "id" });
    return record;
  }

  return [
    defineRoute({
      method: "POST",
      url: "/v1/jobs",
      tag: "jobs",
      summary: "Queue a render of any size; answers at once with the job's id",
      description:
        `Runs the work of POST /v1/<endpoint> (${endpoints.join(", ")}) in the background, without the synchronous cost limit. ` +
        "The body is checked now (400 names the field as body.<path>). 202 with `Location: /v1/jobs/<id>`. " +
        "An identical request whose result is still kept is done at once (`reused: true`).",
      body: requestSchema,
      responses: {
        202: { description: "queued (or done at once when the same result is kept)", json: "Job" },
        400: { description: "an unknown endpoint, or a field of the body or query out of range" },
        503: { description: "the job store (Redis) does not answer: answered within a second, with Retry-After" },
      },
      handle: async ({ body, reply }) => {
        const job = body as JobRequest;
        const renderer = registry[job.endpoint];
        const rawQuery = { ...job.query };
        if (job.format !== undefined) {
          if (rawQuery.format !== undefined && rawQuery.format !== job.format) {
            throw new ClientError("invalid-request", "body fields 'format' and 'query.format' disagree; send one of them", { field: "format" });
          }
          rawQuery.format = job.format;
        }
        const parsedBody = parseNested(renderer.body, job.body, "body");
        const parsedQuery = parseNested(renderer.query, rawQuery, "query");
        const record = await backend.submit({ endpoint: job.endpoint, body: job.body, query: rawQuery, hash: jobHash(job.endpoint, parsedBody, parsedQuery) });
        return reply.status(202).header("location", `/v1/jobs/${record.id}`).send(jobView(record));
      },
    }),
    defineRoute({
      method: "GET",
      url: "/v1/jobs/:id",
      tag: "jobs",
      summary: "A job's state (queued, running, done, failed, cancelled) and progress",
      description:
        "progress.fraction runs from 0 to 1 and never falls: the work done (kernel rows found or computed, then spectral sum, colour, " +
        "encoding), weighted by measured cost. progress.stage names the step; progress.secondsLeft estimates the time left from the " +
        "rate so far, (1 − f)·elapsed / (f − f₀), null until there is one. Updated within 0.5 s of a change, at once for each 1 %.",
      responses: {
        200: { description: "the job", json: "Job" },
        404: { description: "no such job; `lost: true` when the queue lost it (Redis restarted without its data): submit it again" },
        503: { description: "the job store (Redis) does not answer; Retry-After says when to ask again" },
      },
      handle: async ({ request }) => jobView(await find(idOf(request))),
    }),
    defineRoute({
      method: "GET",
      url: "/v1/jobs/:id/events",
      tag: "jobs",
      summary: "A job's progress as server-sent events, ending with one final event",
      description:
        "Each event's data is the job as GET /v1/jobs/:id gives it (schema `Job` in components.schemas). `event: progress` while queued or running; the stream ends " +
        "with `event: done`, `event: failed` or `event: cancelled`.",
      responses: { 200: { description: "the event stream", contentTypes: ["text/event-stream"] }, 404: { description: "no such job" } },
      handle: async ({ request, reply }) => streamEvents(await find(idOf(request)), reply),
    }),
    defineRoute({
      method: "GET",
      url: "/v1/jobs/:id/result",
      tag: "jobs",
      summary: "The finished job's output, with the content type and headers of the synchronous endpoint",
      responses: {
        200: { description: "the output" },
        404: { description: "no such job" },
        409: { description: "not finished yet, failed or cancelled" },
        410: { description: "the result has expired; submit the job again" },
      },
      handle: async ({ request, reply }) => {
        const record = await find(idOf(request));
        if (record.state === "queued" || record.state === "running") {
          reply.header("retry-after", "1");
          throw new JobError(
            "job-not-finished",
            `job ${record.id} is ${record.state} (${Math.round(100 * record.progress.fraction)} %); its result is here once GET /v1/jobs/${record.id} says done`,
            { state: record.state, progress: record.progress },
          );
        }
        if (record.state === "failed") throw new JobError("job-failed", `job ${record.id} failed: ${record.error ?? "no reason given"}`, { state: record.state });
        if (record.state === "cancelled") throw new JobError("job-cancelled", `job ${record.id} was cancelled; it has no result`, { state: record.state });
        const output = await backend.result(record.hash);
        if (!output) throw new JobError("result-expired", `job ${record.id}'s result has expired; submit the job again`);
        reply.header("x-antisolar-job", record.id);
        return sendOutput(reply, output, record.reused ? "hit" : "miss");
      },
    }),
    defineRoute({
      // route-spec.ts lists GET and POST only; DELETE passes through app.ts and openapi.ts unchanged.
      method: "DELETE",
      url: "/v1/jobs/:id",
      tag: "jobs",
      summary: "Cancel a job: its render stops, and its state becomes cancelled (a finished job is left as it is)",
      responses: { 200: { description: "the job after cancelling", json: "Job" }, 404: { description: "no such job" } },
      handle: async ({ request }) => {
        const record = await backend.cancel(idOf(request));
        if (!record) throw new ClientError("not-found", `no job '${idOf(request)}'`, { field: "id" });
        return jobView(record);
      },
    }),
    defineRoute({
      method: "GET",
      url: "/readyz",
      tag: "service",
      summary: "200 when the dependencies answer (Redis, when REDIS_URL is set); 503 otherwise",
      responses: { 200: { description: "ready", json: "Ready" }, 503: { description: "a dependency does not answer" } },
      handle: async ({ reply }) => {
        const check = await backend.ready();
        if (!check.ok) {
          reply.header("retry-after", "5");
          throw new JobError("not-ready", `not ready: ${check.detail}`);
        }
        const ready: ReadyResponse = { status: "ready", jobs: backend.mode, detail: check.detail };
        return ready;
      },
    }),
  ];

  function streamEvents(first: JobRecord, reply: FastifyReply) {
    reply.hijack();
    const raw = reply.raw;
    raw.writeHead(200, {
      // Headers hooks already set (CORS, security) would be lost with the hijack otherwise.
      ...(reply.getHeaders() as Record<string, string>),
      "content-type": "text/event-stream; charset=utf-8",
      "cache-control": "no-cache",
      connection: "keep-alive",
      "x-accel-buffering": "no",
    });
    let last = "";
    let sequence = 0;
    let closed = false;
    let chain = Promise.resolve();
    const write = (record: JobRecord) => {
      const text = JSON.stringify(jobView(record));
      if (text === last || closed) return;
      last = text;
      const final = terminalStates.includes(record.state);
      raw.write(`id: ${++sequence}\nevent: ${final ? record.state : "progress"}\ndata: ${text}\n\n`);
      if (final) finish();
    };
    const poke = () => {
      chain = chain
        .then(async () => {
          if (closed) return;
          const record = await backend.get(first.id);
          if (record) write(record);
          else finish();
        })
        .catch(() => finish());
    };
    const unwatch = backend.watch(first.id, poke);
    const poll = setInterval(poke, POLL_MS);
    const heartbeat = setInterval(() => raw.write(": still here\n\n"), HEARTBEAT_MS);
    function finish() {
      if (closed) return;
      closed = true;
      jobs.closing.removeEventListener("abort", finish);
      unwatch();
      clearInterval(poll);
      clearInterval(heartbeat);
      raw.end();
    }
    raw.on("close", finish);
    if (jobs.closing.aborted) finish();
    else jobs.closing.addEventListener("abort", finish, { once: true });
    write(first);
    return reply;
  }
}
