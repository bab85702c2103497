"use server";
import { z } from "zod";
import { getDb } from "@/db";
import { actionComesFromHere, CROSS_ORIGIN_REFUSED, publicAction } from "@/lib/auth/guard";
import { AppError } from "@/lib/auth/errors";
import { secret } from "@/lib/forms";
import { confirmRegistration } from "@/lib/owners/registrations";

const confirmSchema = z.object({ token: secret(z.string().min(10, "This link is not complete.").max(200)) });

/** The button on the confirmation link's page: the registration counts from here (a GET never writes). */
export const confirmRegistrationAction = publicAction(confirmSchema, async (input) => {
  if (!(await actionComesFromHere())) throw new AppError(403, CROSS_ORIGIN_REFUSED);
  const done = await confirmRegistration(getDb(), { token: input.token });
  return {
    ok: true,
    message: `Thank you: you are registered as an owner of pair ${done.pair}.${done.consent ? " We will send you recall notices and service mail; every message carries a link to stop them." : ""}`,
  };
});
