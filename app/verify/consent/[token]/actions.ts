"use server";
import { z } from "zod";
import { getDb } from "@/db";
import { actionComesFromHere, CROSS_ORIGIN_REFUSED, publicAction } from "@/lib/auth/guard";
import { AppError } from "@/lib/auth/errors";
import { secret } from "@/lib/forms";
import { withdrawConsent } from "@/lib/owners/registrations";

const withdrawSchema = z.object({ token: secret(z.string().min(10, "This link is not complete.").max(200)) });

/** The button on the page a withdrawal link opens: the owner's consent is appended as withdrawn. */
export const withdrawConsentAction = publicAction(withdrawSchema, async (input) => {
  if (!(await actionComesFromHere())) throw new AppError(403, CROSS_ORIGIN_REFUSED);
  const done = await withdrawConsent(getDb(), { token: input.token });
  return {
    ok: true,
    message: done.pending
      ? "Your consent is withdrawn: if you confirm your registration, we will not send you recall notices or service mail."
      : "Your consent is withdrawn: we will not send you recall notices or service mail any more.",
  };
});
