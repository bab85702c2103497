import { z } from "zod";
import { emailAddress } from "@/lib/input/email";

/** An owner's registration of their pair, from the certificate check. Shared by the form and the action. */
export const ownerRegistrationSchema = z.object({
  code: z.string().trim().min(1, "This page's certificate code is missing: open the check again from the certificate.").max(64),
  name: z.string().trim().min(1, "Give your name.").max(200, "The name is at most 200 characters."),
  email: emailAddress("Give your e-mail address: the confirmation link goes there."),
  town: z.string().trim().min(1, "Give your town.").max(120, "The town is at most 120 characters."),
  country: z
    .string()
    .trim()
    .toUpperCase()
    .regex(/^[A-Z]{2}$/, "Give the country as two letters, e.g. GB."),
  // A checkbox sends "on" when ticked and nothing when not.
  consent: z.literal("on").optional(),
});

/** The one answer, whether or not the e-mail is known, the pair has owners or a limit was reached. */
export const REGISTRATION_SENT = "If the address is right, a message is on its way. Open the link in it to confirm the registration; until then nothing is recorded.";
