// The static files' security headers, in case a file is answered without the proxy (proxy.ts sets
// the same on every path it sees, and a nonce policy on pages; lib/auth/security-headers.ts).
const STATIC_HEADERS = [
  { key: "X-Content-Type-Options", value: "nosniff" },
  { key: "Referrer-Policy", value: "strict-origin-when-cross-origin" },
  { key: "X-Frame-Options", value: "DENY" },
  { key: "Permissions-Policy", value: "camera=(), microphone=(), geolocation=(), payment=(), usb=(), serial=(), bluetooth=(), interest-cohort=()" },
  { key: "Content-Security-Policy", value: "default-src 'none'; frame-ancestors 'none'; base-uri 'none'; form-action 'none'" },
];

/** @type {import('next').NextConfig} */
const nextConfig = {
  // forbidden() renders app/forbidden.tsx with status 403.
  experimental: { authInterrupts: true },
  // Native or Node-only packages stay outside the server bundle.
  serverExternalPackages: ["@node-rs/argon2", "@libsql/client", "libsql", "nodemailer", "smtp-server", "mailparser"],
  poweredByHeader: false,
  async headers() {
    return ["/_next/static/:path*", "/fonts/:path*", "/favicon.ico"].map((source) => ({ source, headers: STATIC_HEADERS }));
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
