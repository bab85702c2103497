// The security headers of static files (in case one is answered without the proxy) and of the API,
// which the proxy does not see (proxy.ts sets the same on every path it sees, and a nonce policy on
// pages; lib/auth/security-headers.ts).
const STATIC_HEADERS = [
  { key: "X-Content-Type-Options", value: "nosniff" },
  { key: "Referrer-Policy", value: "strict-origin-when-cross-origin" },
  { key: "X-Frame-Options", value: "DENY" },
  { key: "Permissions-Policy", value: "camera=(), microphone=(), geolocation=(), payment=(), usb=(), serial=(), bluetooth=(), interest-cohort=()" },
  { key: "Content-Security-Policy", value: "default-src 'none'; frame-ancestors 'none'; base-uri 'none'; form-action 'none'" },
];

/** @type {import('next').NextConfig} */
const nextConfig = {
  experimental: {
    // forbidden() renders app/forbidden.tsx with status 403.
    authInterrupts: true,
    // The lab's forms take a 2 MB response file; the proxy answers 413 above this (lib/input/body.ts ACTION_BODY_LIMIT, the same 3 MB).
    serverActions: { bodySizeLimit: "3mb" },
  },
  // Native or Node-only packages stay outside the server bundle.
  serverExternalPackages: ["@node-rs/argon2", "@libsql/client", "libsql", "nodemailer", "smtp-server", "mailparser"],
  poweredByHeader: false,
  // The test suite type-checks first (npm run check), so the e2e build it makes need not do it again.
  typescript: { ignoreBuildErrors: process.env.TWINLEAF_BUILD_SKIP_TYPECHECK === "1" },
  async headers() {
    return [
      ...["/_next/static/:path*", "/fonts/:path*", "/favicon.ico", "/api/:path*"].map((source) => ({ source, headers: STATIC_HEADERS })),
      // A caught mail's attachment is shown sandboxed (lib/auth/security-headers.ts apiPolicy).
      {
        source: "/api/v1/admin/mail/:id/attachments/:index",
        headers: [{ key: "Content-Security-Policy", value: `${STATIC_HEADERS.at(-1).value}; sandbox` }],
      },
    ];
  },
  // Each area's URL is its own word (lib/paths.ts); addresses bookmarked under the old words still arrive.
  async redirects() {
    return [
      { source: "/flitches", destination: "/veneer", permanent: false },
      { source: "/flitches/receive", destination: "/veneer/receive", permanent: false },
      { source: "/flitches/:identity", destination: "/veneer/flitches/:identity", permanent: false },
      { source: "/flitches/:identity/confirmed", destination: "/veneer/flitches/:identity/confirmed", permanent: false },
      { source: "/pairs", destination: "/cabinet", permanent: false },
      { source: "/pairs/batches", destination: "/cabinet/lacquer", permanent: false },
      { source: "/pairs/:identity", destination: "/cabinet/pairs/:identity", permanent: false },
      { source: "/containment", destination: "/quality", permanent: false },
      { source: "/dispatch", destination: "/packing", permanent: false },
      { source: "/dispatch/pack/:pair", destination: "/packing/pack/:pair", permanent: false },
    ];
  },
};
export default nextConfig;
