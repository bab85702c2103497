import { z } from "zod";
import { getDb } from "@/db";
import { guardedRoute } from "@/lib/auth/guard";
import { affectedSerials, raiseContainment } from "@/lib/containments";

// Types only: what each field may say (a known target, a reason, a severity) is lib/containments' to judge, in words.
const body = z.object({
  target: z.union([z.string(), z.object({ station: z.string(), from: z.string(), to: z.string() })], {
    error: "target is a serial, lot, batch or flitch, or { station, from, to } with the window's dates.",
  }),
  reason: z.string({ error: "reason is the words of why it is suspect." }),
  severity: z.string({ error: "severity is minor, major or critical." }),
});

/**
 * Raises a containment (quality) on a lot, batch, flitch or serial, or a station's steps in a
 * window: 201 with its code and every affected serial, grouped by where it is now. Refusals are
 * 4xx with the field named, and nothing is written.
 */
export const POST = guardedRoute("quality.work", { body }, async ({ body, user }) => {
  const db = getDb();
  const raised = await raiseContainment(db, body, user);
  const rows = await affectedSerials(db, raised.id);
  return Response.json(
    {
      code: raised.code,
      affected: rows.map((r) => ({
        serial: r.serial,
        kind: r.kind,
        state: r.itemState,
        group: r.group,
        ...(r.dealer ? { dealer: { code: r.dealer.code, name: r.dealer.name } } : {}),
        ...(r.owner ? { owner: r.owner } : {}),
      })),
    },
    { status: 201 },
  );
});
