import Fastify, { type FastifyInstance, type FastifyError, type FastifyServerOptions } from "fastify";
import fastifyPlugin from "fastify-plugin";
import { packageVersion } from "../pipeline/config/resources.js";
import { ClientError } from "../pipeline/requests/client-error.js";
import { buildOpenApi } from "./openapi.js";
import { renderDocsPage } from "./docs-page.js";
import type { RouteSpec } from "./route-spec.js";
import { parseOrThrow } from "../pipeline/requests/parse-request.js";
import { previewText } from "../pipeline/requests/preview.js";
import { serviceRoutes } from "./routes/service.js";
import { opticsRoutes } from "./routes/optics.js";
import { profileRoutes } from "./routes/profile.js";
import { figureRoutes } from "./routes/figures.js";
import { loadPresets } from "../pipeline/requests/presets.js";
import { createKernelRuntime } from "../pipeline/kernels/runtime.js";
import { lutRoutes } from "./routes/lut.js";
import { viewRoutes } from "./routes/view.js";
import { registerWeb } from "./routes/web.js";
import { registerHardening } from "./plugins/hardening.js";
import { registerRefusedBodyDrain } from "./plugins/drain-refused-body.js";
import { registerJsonBody } from "./plugins/json-body.js";
import { frameworkErrorOptions } from "./plugins/framework-errors.js";
import { boundedLogger } from "./plugins/bounded-logs.js";
import { jobRoutes } from "./routes/jobs.js";
import { createJobSystem } from "../pipeline/jobs/job-system.js";
import { loadConfig, type Config } from "../pipeline/config/config.js";
import { deadlines } from "../pipeline/process/shutdown.js";
import { within } from "../pipeline/redis/connection.js";

export interface AppOptions {
  config?: Partial<Config>;
  logger?: boolean;
}

export interface AppPluginOptions {
  config: Config;
}

/** The instance options the app expects (body limit, time limit, request ids) for a configuration. */
export function appServerOptions(config: Config, logger = false): FastifyServerOptions {
  return {
    logger: logger ? boundedLogger(config.logLevel) : false,
    ...frameworkErrorOptions(),
    bodyLimit: config.bodyLimitBytes,
    requestTimeout: config.requestTimeoutMs,
    genReqId: () => crypto.randomUUID(),
  };
}

/**
 * Builds a ready-to-listen instance: Fastify with appServerOptions, and the app plugin on it. http/main.ts only
 * listens; tests call buildApp() and inject requests or listen on a free port.
 */
export async function buildApp(options: AppOptions = {}): Promise<FastifyInstance> {
  const config = { ...loadConfig(process.env), ...options.config };
  const app = Fastify(appServerOptions(config, options.logger));
  await app.register(antisolarApp, { config });
  return app;
}

/**
 * The whole service as a fastify plugin: hardening, the routes with their OpenAPI document and docs page, the
 * explorer page, the job system, and the error and not-found handlers. It is not encapsulated (fastify-plugin), so
 * its hooks and handlers apply to the instance it is registered on.
 */
export const antisolarApp = fastifyPlugin(registerApp, { name: "antisolar", fastify: "5.x" });

async function registerApp(app: FastifyInstance, { config }: AppPluginOptions): Promise<void> {
  await registerHardening(app, config);
  registerRefusedBodyDrain(app);
  registerJsonBody(app);

  // JSON only: a text/plain body must be a 415, not parsed as a string.
  app.removeContentTypeParser("text/plain");

  const runtime = createKernelRuntime(config);
  const jobs = await createJobSystem(config, runtime, { onError: (err, job) => app.log.error({ err, job: job.id }, "job failed") });
  // On close: event streams end first (they would hold the server open), then, once requests in flight have ended,
  // a job this process runs itself (JOBS_IN_PROCESS) finishes or goes back to the queue before the grace is over.
  let closeStartedAt = Date.now();
  app.addHook("preClose", async () => {
    closeStartedAt = Date.now();
    jobs.endStreams();
  });
  app.addHook("onClose", async () => {
    const { abandonAt, exitAt } = deadlines(config.shutdownGraceMs, closeStartedAt);
    await jobs.close(abandonAt);
    app.log.info("job system closed; stopping kernel threads");
    // Ahead of the hard exit: kernel packs still queued for the cache are dropped (they are only a cache).
    await within(runtime.close(), exitAt - Date.now() - 250);
  });
  const routes: RouteSpec[] = [
    ...serviceRoutes(),
    ...opticsRoutes(config),
    ...profileRoutes(config, loadPresets(), runtime.kernels),
    ...figureRoutes(config, runtime.kernels),
    ...lutRoutes(config, runtime.kernels),
    ...viewRoutes(config, runtime.kernels),
    ...jobRoutes(jobs),
  ];
  const openapi = buildOpenApi(routes, packageVersion());
  const docsHtml = renderDocsPage(openapi);

  for (const route of routes) {
    app.route({
      method: route.method,
      url: route.url,
      handler: async (request, reply) => {
        // No body at all means "all defaults"; an explicit JSON null is not an object and is refused.
        const body = route.body ? parseOrThrow(route.body, request.body === undefined ? {} : request.body, "body") : undefined;
        const query = route.query ? parseOrThrow(route.query, request.query ?? {}, "query") : undefined;
        return route.handle({ body, query, request, reply });
      },
    });
  }
  app.get("/openapi.json", async () => openapi);
  app.get("/docs", async (_request, reply) => reply.type("text/html; charset=utf-8").send(docsHtml));

  await registerWeb(app);

  app.setNotFoundHandler((request, reply) => {
    const err = new ClientError("not-found", `no route ${previewText(request.method, 20)} ${previewText(request.url.split("?")[0])}; see /docs`);
    reply.status(err.status).send(err.toBody(request.id));
  });

  app.setErrorHandler((error: FastifyError | ClientError, request, reply) => {
    if (error instanceof ClientError) {
      // A dependency away (503): the body says how long to wait, and so does the header.
      if (typeof error.details.retryAfterS === "number") reply.header("retry-after", String(error.details.retryAfterS));
      reply.status(error.status).send(error.toBody(request.id));
      return;
    }
    const mapped = mapFastifyError(error as FastifyError);
    if (mapped) {
      reply.status(mapped.status).send(mapped.toBody(request.id));
      return;
    }
    request.log.error({ err: error }, "unhandled error");
    reply.status(500).send({ error: "internal", message: "internal error; report the requestId", requestId: request.id });
  });
}

function mapFastifyError(error: FastifyError): ClientError | undefined {
  if (error.name === "AbortError" || error.cause instanceof ClientError) {
    return error.cause instanceof ClientError ? error.cause : new ClientError("client-closed", "the request was cancelled");
  }
  switch (error.code) {
    case "FST_ERR_CTP_INVALID_MEDIA_TYPE":
      return new ClientError("unsupported-media-type", "send the body as application/json", {
        allowed: "application/json",
      });
    case "FST_ERR_CTP_BODY_TOO_LARGE":
      return new ClientError("body-too-large", "the request body is larger than the limit");
    case "FST_ERR_CTP_EMPTY_JSON_BODY":
      return new ClientError("invalid-json", "the body is empty but says it is JSON; send {} for all defaults");
    case "FST_ERR_REQUEST_TIMEOUT":
      return new ClientError("timeout", "the request took longer than the synchronous limit; use POST /v1/jobs");
    case "FST_ERR_CTP_INVALID_JSON_BODY":
      return new ClientError("invalid-json", `the body is not valid JSON: ${error.message}`);
  }
  if (error.statusCode === 400 && /JSON/i.test(error.message)) {
    return new ClientError("invalid-json", `the body is not valid JSON: ${error.message}`);
  }
  if (error.statusCode && error.statusCode >= 400 && error.statusCode < 500) {
    return new ClientError("invalid-request", error.message);
  }
  return undefined;
}
