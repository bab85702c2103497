import "server-only";
import { workshopTimeZone } from "./workshop-time";

/**
 * Settings the server cannot run without, checked once at start (instrumentation.ts): a bad one
 * stops the server with a message that names it, rather than failing every page later.
 */
export function checkSettingsAtStart(): void {
  try {
    workshopTimeZone();
  } catch (e) {
    console.error(`Twinleaf cannot start: ${(e as Error).message}`);
    process.exit(1);
  }
}
