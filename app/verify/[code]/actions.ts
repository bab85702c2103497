"use server";
import { getDb } from "@/db";
import { actionComesFromHere, appBaseUrl, clientAddress, CROSS_ORIGIN_REFUSED, publicAction } from "@/lib/auth/guard";
import { AppError } from "@/lib/auth/errors";
import { requestRegistration } from "@/lib/owners/registrations";
import { ownerRegistrationSchema } from "./schemas";

/** The one answer, whether or not the e-mail is known, the pair has owners or a limit was reached. */
export const REGISTRATION_SENT = "If the address is right, a message is on its way. Open the link in it to confirm the registration; until then nothing is recorded.";

export const registerOwnerAction = publicAction(ownerRegistrationSchema, async (input) => {
  if (!(await actionComesFromHere())) throw new AppError(403, CROSS_ORIGIN_REFUSED);
  await requestRegistration(getDb(), {
    code: input.code,
    details: { name: input.name, email: input.email, town: input.town, country: input.country, consent: input.consent === "on" },
    baseUrl: await appBaseUrl(),
    address: await clientAddress(),
  });
  return { ok: true, message: REGISTRATION_SENT };
});
