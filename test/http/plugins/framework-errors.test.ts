// Node's HTTP parser errors and fastify's routing errors as our errors: status (RFC 6585 §5 for 431; RFC 9110
// §15.5.9 for 408, §15.5.15 for 414), a stable code, the field. (Through a real socket: test/http/hostile-input.test.ts.)
import { describe, it, expect } from "vitest";
import type { FastifyError } from "fastify";
import { connectionError, routingError, MAX_PARAM_CHARS } from "../../../http/plugins/framework-errors.js";

const withCode = (code: string) => Object.assign(new Error(code), { code });

describe("framework errors", () => {
  it("map Node's parser codes to 431, 408 and 400", () => {
    expect(connectionError(withCode("HPE_HEADER_OVERFLOW"))).toMatchObject({ status: 431, code: "headers-too-large", details: { field: "headers" } });
    expect(connectionError(withCode("ERR_HTTP_REQUEST_TIMEOUT"))).toMatchObject({ status: 408, code: "request-timeout" });
    const other = connectionError(withCode(`HPE_INVALID_METHOD${"x".repeat(1000)}`));
    expect(other).toMatchObject({ status: 400, code: "invalid-request" });
    expect(other.message.length).toBeLessThan(120);
  });

  it("map fastify's routing errors to 400 and 414, and leave others to the 500 path", () => {
    expect(routingError(withCode("FST_ERR_BAD_URL") as FastifyError)).toMatchObject({ status: 400, details: { field: "url" } });
    const long = routingError(withCode("FST_ERR_MAX_PARAM_LENGTH") as FastifyError);
    expect(long).toMatchObject({ status: 414, code: "uri-too-long" });
    expect(long?.message).toContain(String(MAX_PARAM_CHARS));
    expect(routingError(withCode("FST_ERR_ASYNC_CONSTRAINT") as FastifyError)).toBeUndefined();
  });
});
