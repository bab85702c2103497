"use server";
import { getDb } from "@/db";
import { AppError } from "@/lib/auth/errors";
import { guardedAction } from "@/lib/auth/guard";
import { paths } from "@/lib/paths";
import { openCase } from "@/lib/service/intake";
import { intakeFormSchema } from "./schemas";

export const openCaseAction = guardedAction("service.work", intakeFormSchema, async (input, user) => {
  if (input.ownerMode === "new" && !input["owner.consent"]) {
    throw new AppError(400, "Say whether the owner agrees to be contacted.", { "owner.consent": ["Say whether the owner agrees to be contacted."] });
  }
  if (input.ownerMode === "record" && !input.ownerId) throw new AppError(400, "Pick an owner from the list, or give a new one.", { ownerId: ["Pick an owner from the list, or give a new one."] });
  const r = await openCase(
    getDb(),
    {
      serial: input.serial,
      symptom: input.symptom,
      returnedBy: input.returnedBy,
      receivedOn: input.receivedOn || null,
      dealerCode: input.dealerCode || null,
      ownerId: input.ownerMode === "record" ? input.ownerId : null,
      owner:
        input.ownerMode === "new"
          ? { name: input["owner.name"], email: input["owner.email"] || null, town: input["owner.town"], country: input["owner.country"], consent: input["owner.consent"] === "yes" }
          : null,
    },
    user,
  );
  return { ok: true, message: `Case ${r.case.code} is open.`, revalidate: [paths.service], redirectTo: paths.serviceCase(r.case.code) };
});
