import { defineRoute, type RouteSpec } from "../route-spec.js";
import type { HealthResponse } from "../../schemas/responses/service-response.js";

export function serviceRoutes(): RouteSpec[] {
  return [
    defineRoute({
      method: "GET",
      url: "/healthz",
      tag: "service",
      summary: "200 when the process can serve requests",
      responses: { 200: { description: "the process is alive", json: "Health" } },
      handle: async (): Promise<HealthResponse> => ({ status: "ok", uptimeS: Math.round(process.uptime()) }),
    }),
  ];
}
