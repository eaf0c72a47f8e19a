import { buildApp } from "./app.js";
import { loadConfig } from "../pipeline/config/config.js";

const config = loadConfig(process.env);
const app = await buildApp({ logger: true });

const shutdown = async (signal: string) => {
  app.log.info({ signal }, "shutting down; finishing requests in flight");
  await app.close();
  process.exit(0);
};
process.on("SIGINT", () => void shutdown("SIGINT"));
process.on("SIGTERM", () => void shutdown("SIGTERM"));

await app.listen({ port: config.port, host: config.host });
