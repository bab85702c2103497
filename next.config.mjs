/** @type {import('next').NextConfig} */
const nextConfig = {
  // forbidden() renders app/forbidden.tsx with status 403.
  experimental: { authInterrupts: true },
  // Native or Node-only packages stay outside the server bundle.
  serverExternalPackages: ["@node-rs/argon2", "@libsql/client", "libsql", "nodemailer", "smtp-server", "mailparser"],
  poweredByHeader: false,
};
export default nextConfig;
