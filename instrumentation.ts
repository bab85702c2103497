// Checks the settings the server cannot run without, then starts the outbox sender inside the
// server process (Node runtime only), so queued mail is delivered and retried whether or not
// anyone is looking at a page.
export async function register() {
  if (process.env.NEXT_RUNTIME !== "nodejs") return;
  // Before any request is served: limits read the connection's address from this stamp.
  const { stampPeerAddress } = await import("./lib/auth/peer-stamp");
  stampPeerAddress();
  const { checkSettingsAtStart } = await import("./lib/start-checks");
  checkSettingsAtStart();
  if (process.env.MAIL_SENDER === "off") return;
  const { startMailSender } = await import("./lib/mail/sender");
  const intervalMs = Number(process.env.MAIL_SEND_INTERVAL_MS) || 5000;
  startMailSender({ intervalMs });
}
