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
