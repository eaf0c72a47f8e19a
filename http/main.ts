import { buildApp } from "./app.js";
import { loadConfig } from "../pipeline/config/config.js";
import { exitOnSignals } from "../pipeline/process/shutdown.js";

const config = loadConfig(process.env);
const app = await buildApp({ logger: true });

// SIGTERM: no new connections, requests in flight finish (or are aborted shortly before the grace ends), Redis
// connections close whether or not Redis answers; a second signal exits at once.
exitOnSignals({
  graceMs: config.shutdownGraceMs,
  log: (event) => app.log.warn(event),
  stop: async ({ abandonAt }) => {
    const abort = setTimeout(() => app.server.closeAllConnections(), Math.max(0, abandonAt - Date.now()));
    try {
      await app.close();
    } finally {
      clearTimeout(abort);
    }
  },
});

await app.listen({ port: config.port, host: config.host });
