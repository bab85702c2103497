// Checks the settings the server cannot run without, then starts the outbox sender inside the
// server process (Node runtime only), so queued mail is delivered and retried whether or not
// anyone is looking at a page.
export async function register() {
  if (process.env.NEXT_RUNTIME !== "nodejs") return;
  // An unknown workshop time zone stops the server at start, naming the setting, rather than failing every page.
  const { workshopTimeZone } = await import("./lib/workshop-time");
  try {
    workshopTimeZone();
  } catch (e) {
    console.error(`Twinleaf cannot start: ${(e as Error).message}`);
    process.exit(1);
  }
  if (process.env.MAIL_SENDER === "off") return;
  const { startMailSender } = await import("./lib/mail/sender");
  const intervalMs = Number(process.env.MAIL_SEND_INTERVAL_MS) || 5000;
  startMailSender({ intervalMs });
}
