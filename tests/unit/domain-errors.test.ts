import { STATUS_CODES } from "node:http";
import { describe, expect, it } from "vitest";
import { DomainError, type DomainErrorKind } from "~/.server/errors";
import { jsonFailure, pageFailure, STATUS_FOR_KIND, statusFor } from "~/.server/replies";
import { TrainingInputError } from "~/lib/training";

// Each kind's status and its reason phrase as Node's own table (node:http STATUS_CODES) names it; the meanings are
// RFC 9110 §15 (400–415, 422, 502, 503) and RFC 6585 §4 (429).
const EXPECTED: [DomainErrorKind, number, string][] = [
  ["invalid", 400, "Bad Request"],
  ["forbidden", 403, "Forbidden"],
  ["not_found", 404, "Not Found"],
  ["conflict", 409, "Conflict"],
  ["confirm_needed", 409, "Conflict"],
  ["stale", 409, "Conflict"],
  ["gone", 410, "Gone"],
  ["too_large", 413, "Payload Too Large"],
  ["unsupported", 415, "Unsupported Media Type"],
  ["unreadable", 422, "Unprocessable Entity"],
  ["rate_limited", 429, "Too Many Requests"],
  ["upstream", 502, "Bad Gateway"],
  ["busy", 503, "Service Unavailable"],
];

describe("kind → status", () => {
  it.each(EXPECTED)("%s → %i %s", (kind, status, phrase) => {
    expect(statusFor(kind)).toBe(status);
    expect(STATUS_CODES[status]).toBe(phrase);
  });

  it("covers every kind", () => {
    expect(Object.keys(STATUS_FOR_KIND).sort()).toEqual(EXPECTED.map(([k]) => k).sort());
  });
});

describe("route-edge replies", () => {
  it("answers JSON with the kind's status and the error's extras", async () => {
    const res = jsonFailure(new DomainError("stale", "Changed elsewhere.", { version: 7 }));
    expect(res.status).toBe(409);
    expect(res.headers.get("cache-control")).toBe("private, no-store");
    expect(await res.json()).toEqual({ error: "Changed elsewhere.", version: 7 });
  });

  it("sends Retry-After for a used-up limit", () => {
    const res = jsonFailure(new DomainError("rate_limited", "Slow down.", { retryAfterS: 30 }));
    expect(res.status).toBe(429);
    expect(res.headers.get("retry-after")).toBe("30");
    const page = pageFailure(new DomainError("rate_limited", "Slow down.", { retryAfterS: 12 }), (e) => ({
      error: e.message,
    }));
    expect(page.init?.status).toBe(429);
    expect(new Headers(page.init?.headers).get("retry-after")).toBe("12");
  });

  it("builds the page's own reply shape", () => {
    const page = pageFailure(new DomainError("invalid", "Give the test date.", { field: "testedOn" }), (e) => ({
      error: e.message,
      field: e.field,
    }));
    expect(page.init?.status).toBe(400);
    expect(page.data).toEqual({ error: "Give the test date.", field: "testedOn" });
  });

  it("maps the engine's input errors as invalid", () => {
    expect(jsonFailure(new TrainingInputError("out_of_range", "Too high.")).status).toBe(400);
  });

  it("rethrows anything that is not a domain failure", () => {
    const bug = new TypeError("x is undefined");
    expect(() => jsonFailure(bug)).toThrow(bug);
    const response = new Response("Not found", { status: 404 });
    expect(() => pageFailure(response, () => ({}))).toThrow();
  });
});
