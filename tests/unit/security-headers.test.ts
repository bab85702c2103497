import { describe, expect, test } from "vitest";
import { apiPolicy, cameOverHttps, COMMON_HEADERS, newNonce, NOTHING_POLICY, pagePolicy, securityHeadersFor } from "@/lib/auth/security-headers";

/** The directives of a policy, by name (CSP Level 3 § 2.2.1: a policy is a ;-separated list). */
function directives(policy: string): Map<string, string[]> {
  return new Map(
    policy
      .split(";")
      .map((d) => d.trim().split(/\s+/))
      .filter((d) => d[0])
      .map(([name, ...values]) => [name!, values]),
  );
}

const page = (path: string, headers: Record<string, string> = {}, trustProxy = false) => securityHeadersFor(new URL(`http://localhost:3000${path}`), new Headers(headers), { trustProxy });

describe("every response", () => {
  // Values: OWASP Secure Headers Project, "Response headers" (nosniff, strict-origin-when-cross-origin, DENY).
  test.each([
    ["/sign-in", "X-Content-Type-Options", "nosniff"],
    ["/sign-in", "Referrer-Policy", "strict-origin-when-cross-origin"],
    ["/sign-in", "X-Frame-Options", "DENY"],
    ["/api/v1/me", "X-Content-Type-Options", "nosniff"],
    ["/api/v1/me", "Referrer-Policy", "strict-origin-when-cross-origin"],
    ["/verify/ABC", "X-Frame-Options", "DENY"],
    ["/no/such/page", "X-Content-Type-Options", "nosniff"],
  ])("%s carries %s: %s", (path, header, value) => {
    expect(page(path).response[header]).toBe(value);
  });

  test("a Permissions-Policy that refuses the camera, microphone and location", () => {
    for (const feature of ["camera=()", "microphone=()", "geolocation=()"]) expect(COMMON_HEADERS["Permissions-Policy"]).toContain(feature);
  });
});

describe("the page policy", () => {
  const nonce = "bm9uY2Ugb2YgdGhlIHRlc3Q=";
  const csp = directives(pagePolicy(nonce));

  // Expected values: Next's guide to a CSP with a nonce (node_modules/next/dist/docs/01-app/02-guides/content-security-policy.md).
  test.each([
    ["script-src", ["'self'", `'nonce-${nonce}'`, "'strict-dynamic'"]],
    ["object-src", ["'none'"]],
    ["base-uri", ["'self'"]],
    ["form-action", ["'self'"]],
    ["frame-ancestors", ["'none'"]],
    ["default-src", ["'self'"]],
  ])("%s is %j", (name, values) => {
    expect(csp.get(name)).toEqual(values);
  });

  test("no 'unsafe-inline' and no 'unsafe-eval' for scripts outside development", () => {
    expect(csp.get("script-src")).not.toContain("'unsafe-inline'");
    expect(csp.get("script-src")).not.toContain("'unsafe-eval'");
    expect(directives(pagePolicy(nonce, { dev: true })).get("script-src")).toContain("'unsafe-eval'");
  });

  test("each request gets its own nonce, of 128 random bits", () => {
    const a = page("/sign-in");
    const b = page("/sign-in");
    expect(a.request["x-nonce"]).not.toBe(b.request["x-nonce"]);
    expect(Buffer.from(a.request["x-nonce"]!, "base64")).toHaveLength(16);
    // Next reads the nonce from the request's policy, so the request carries the same policy as the response.
    expect(a.request["Content-Security-Policy"]).toBe(a.response["Content-Security-Policy"]);
    expect(a.response["Content-Security-Policy"]).toContain(`'nonce-${a.request["x-nonce"]}'`);
    expect(new Set(Array.from({ length: 50 }, newNonce)).size).toBe(50);
  });
});

describe("route handlers' answers", () => {
  test.each([
    ["/api/v1/me", "default-src 'none'; frame-ancestors 'none'; base-uri 'none'; form-action 'none'"],
    ["/api/v1/uploads/12", "default-src 'none'; frame-ancestors 'none'; base-uri 'none'; form-action 'none'"],
    ["/api/v1/pairs/TL-1/certificate", "default-src 'none'; frame-ancestors 'none'; base-uri 'none'; form-action 'none'"],
    // The mail attachment route asks for a sandbox itself; the proxy's header wins, so it repeats it.
    ["/api/v1/admin/mail/4/attachments/0", "default-src 'none'; frame-ancestors 'none'; base-uri 'none'; form-action 'none'; sandbox"],
  ])("%s: %s, and no nonce", (path, policy) => {
    expect(apiPolicy(path)).toBe(policy);
    expect(page(path).response["Content-Security-Policy"]).toBe(policy);
    expect(page(path).request).toEqual({});
  });
});

describe("static files", () => {
  test.each(["/_next/static/chunks/main.js", "/_next/static/css/app.css", "/fonts/text.woff2", "/favicon.ico", "/_next/image?url=x"])("%s: the nothing policy, no nonce", (path) => {
    expect(page(path).response["Content-Security-Policy"]).toBe(NOTHING_POLICY);
    expect(page(path).request).toEqual({});
  });

  test.each(["/favicon.ico.html", "/fontsx", "/_next/staticx"])("%s is a page like any other", (path) => {
    expect(page(path).request["x-nonce"]).toBeTruthy();
  });
});

describe("HSTS only over https", () => {
  test.each([
    ["http://localhost:3000/sign-in", {}, false, false],
    ["http://localhost:3000/sign-in", {}, true, false],
    // Next builds the URL's protocol from X-Forwarded-Proto, so the URL counts for nothing either.
    ["https://twinleaf.test/sign-in", {}, false, false],
    // Anyone can send X-Forwarded-Proto: it counts only when the operator trusts the proxy in front.
    ["http://localhost:3000/sign-in", { "x-forwarded-proto": "https" }, false, false],
    ["http://localhost:3000/sign-in", { "x-forwarded-proto": "https" }, true, true],
    ["http://localhost:3000/sign-in", { "x-forwarded-proto": "http" }, true, false],
    ["http://localhost:3000/sign-in", { "x-forwarded-proto": "https, http" }, true, true],
  ])("%s with %j, proxy trusted %s: %s", (address, headers, trust, https) => {
    expect(cameOverHttps(new Headers(headers), trust)).toBe(https);
    const got = securityHeadersFor(new URL(address), new Headers(headers), { trustProxy: trust }).response;
    // max-age of one year: OWASP HTTP Strict Transport Security Cheat Sheet.
    expect(got["Strict-Transport-Security"]).toBe(https ? "max-age=31536000; includeSubDomains" : undefined);
    expect(directives(got["Content-Security-Policy"]!).has("upgrade-insecure-requests")).toBe(https);
  });
});
