import { DEMO_PASSWORD } from "./data";

/** The demo sign-ins as a plain-text table (e-mail, role, password) for a terminal. */
export function formatSignIns(users: { email: string; roles: readonly string[] }[], password = DEMO_PASSWORD): string {
  const header = ["e-mail", "role", "password"];
  const rows = users.map((u) => [u.email, u.roles.join(", ") || "(none)", password]);
  const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i]!.length)));
  const line = (cells: string[]) => cells.map((c, i) => c.padEnd(widths[i]!)).join("  ").trimEnd();
  return [line(header), line(widths.map((w) => "-".repeat(w))), ...rows.map(line)].join("\n");
}
