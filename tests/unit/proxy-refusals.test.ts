import { describe, expect, test } from "vitest";
import { ACTION_BODY_LIMIT } from "@/lib/input/body";
import { refuseMalformed } from "@/lib/input/requests";

// What the proxy answers before Next.js would answer 500: a broken percent-escape in the path
// (RFC 3986 §2.1: "%" is followed by two hex digits; WHATWG Encoding: bytes must be UTF-8) and a
// server action's body over next.config.mjs's bodySizeLimit.
const req = (method: string, headers: Record<string, string> = {}, body?: BodyInit) =>
  new Request("http://localhost:3000/x", { method, headers, body, duplex: "half" } as RequestInit);

describe("refuseMalformed", () => {
  test.each([
    ["/register/items/%", 400],
    ["/register/items/%zz", 400],
    ["/register/items/%C0%AF", 400],
    ["/register/items/%ED%A0%80", 400],
    ["/api/v1/items/%/trace", 400],
    ["/register/items/S%25", null],
    ["/register/items/P-PW2-26-00042-Q", null],
  ])("GET %s → %j", async (path, status) => {
    const res = await refuseMalformed(req("GET"), path);
    expect(res?.status ?? null).toBe(status);
  });

  test.each([
    ["declared over the limit", { "content-length": String(ACTION_BODY_LIMIT + 1) }, undefined, 413],
    ["declared at the limit", { "content-length": String(ACTION_BODY_LIMIT) }, undefined, null],
    ["chunked over the limit", {}, new Blob([new Uint8Array(ACTION_BODY_LIMIT + 1)]).stream(), 413],
    ["chunked within the limit", {}, new Blob([new Uint8Array(1024)]).stream(), null],
  ])("a page POST %s", async (_name, headers, body, status) => {
    const res = await refuseMalformed(req("POST", headers, body), "/lab/batches/new");
    expect(res?.status ?? null).toBe(status);
    if (res) expect(await res.text()).toMatch(/at most 3 MB|larger than the 3 MB/);
  });
});
