import { getDb } from "@/db";
import { AppError } from "@/lib/auth/errors";
import { guardedRoute } from "@/lib/auth/guard";
import { batchByCode, batchUnitsView } from "@/lib/lab/units";

/** A batch and its units with their state, so a bench knows which serials to measure. */
export const GET = guardedRoute("lab.work", { machine: "lab" }, async ({ params }) => {
  const db = getDb();
  const code = String(params.code ?? "");
  const batch = await batchByCode(db, code);
  if (!batch) throw new AppError(404, `There is no batch ${code}.`);
  const units = await batchUnitsView(db, batch.id);
  return {
    batch: { code: batch.code, partType: batch.partType, partNumber: batch.partNumber, maker: batch.maker, lot: batch.lot, receivedOn: batch.receivedOn },
    units: units.map((u) => ({ serial: u.identity, makerSerial: u.makerSerial, state: u.state, measured: u.responseId !== null, set: u.setCode })),
  };
});
