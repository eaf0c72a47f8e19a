import { defineRoute, type RouteSpec } from "../route-spec.js";

export function serviceRoutes(): RouteSpec[] {
  return [
    defineRoute({
      method: "GET",
      url: "/healthz",
      tag: "service",
      summary: "200 when the process can serve requests",
      responses: { 200: { description: "the process is alive", json: "Health" } },
      handle: async () => ({ status: "ok", uptimeS: Math.round(process.uptime()) }),
    }),
  ];
}
