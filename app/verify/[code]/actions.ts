"use server";
import { getDb } from "@/db";
import { actionComesFromHere, appBaseUrl, clientAddress, CROSS_ORIGIN_REFUSED, publicAction } from "@/lib/auth/guard";
import { AppError } from "@/lib/auth/errors";
import { requestRegistration } from "@/lib/owners/registrations";
import { ownerRegistrationSchema, REGISTRATION_SENT } from "./schemas";

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
