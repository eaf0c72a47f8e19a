import { describe, it, expect } from "vitest";
import { idTimeMs, timeOrderedId } from "../../../pipeline/jobs/job-id.js";

describe("time-ordered job ids", () => {
  it("match RFC 9562 Appendix A.6's example layout: 017f22e2-79b0-7cc3-98c4-dc0c0c07398f is 2022-02-22 19:22:22 UTC", () => {
    // RFC 9562 (Davis, Peabody & Leach, 2024), Appendix A.6: the UUIDv7 test vector with unix_ts_ms 0x017F22E279B0.
    expect(idTimeMs("017f22e2-79b0-7cc3-98c4-dc0c0c07398f")).toBe(Date.UTC(2022, 1, 22, 19, 22, 22));
  });

  it("carry their creation time, version 7 and the RFC variant", () => {
    const now = Date.UTC(2026, 11, 3, 6, 30, 0, 123);
    const id = timeOrderedId(now);
    expect(id).toMatch(/^[0-9a-f]{8}-[0-9a-f]{4}-7[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/);
    expect(idTimeMs(id)).toBe(now);
  });

  it("know no time for ids of other versions", () => {
    expect(idTimeMs("3b241101-e2bb-4255-8caf-4136c566a962")).toBeUndefined();
    expect(idTimeMs("not-an-id")).toBeUndefined();
  });
});
