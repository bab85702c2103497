import { z } from "zod";

const field = (max: number, message: string) => z.string({ error: message }).max(max, message).default("");

/** The intake form's fields as the browser sends them; lib/service/intake.ts checks the rest. */
export const intakeFormSchema = z.object({
  serial: field(200, "Scan or type the serial of the speaker or pair that came back."),
  receivedOn: field(32, "Give the day it arrived as YYYY-MM-DD."),
  returnedBy: z.enum(["owner", "dealer"], { error: "Say who sent it back: the owner or the dealer." }),
  dealerCode: field(32, "Choose a dealer from the list."),
  symptom: field(2000, "Say what is wrong, in at most 2000 characters."),
  ownerMode: z.enum(["record", "new", "none"], { error: "Say whether the owner is on record, new, or not known." }),
  ownerId: field(64, "Pick an owner from the list."),
  "owner.name": field(200, "Give the owner's name (at most 200 characters)."),
  "owner.email": field(254, "Give an e-mail address like name@example.com, or none."),
  "owner.town": field(120, "Give the owner's town (at most 120 characters)."),
  "owner.country": field(8, "Give the country as two letters, e.g. GB."),
  "owner.consent": z.enum(["yes", "no"], { error: "Say whether the owner agrees to be contacted." }).optional(),
});
