/**
 * The intake's input, shared by the JSON route and the form: shapes only. What needs the register
 * (the serial, the owner on record, the dealer, the days) is checked by lib/service/intake.ts.
 */
import { z } from "zod";

const text = (max: number, message: string) => z.string({ error: message }).max(max, message);

export const ownerInput = z.object({
  name: text(200, "Give the owner's name (at most 200 characters)."),
  email: text(254, "Give an e-mail address like name@example.com, or none.").nullish().transform((v) => v ?? null),
  town: text(120, "Give the owner's town (at most 120 characters)."),
  country: text(8, "Give the country as two letters, e.g. GB."),
  consent: z.boolean({ error: "Say whether the owner agrees to be contacted (true or false)." }),
});

export const caseIntakeBody = z.object({
  serial: text(200, "Give the serial of the speaker or pair that came back."),
  symptom: text(2000, "Say what is wrong, in at most 2000 characters."),
  returnedBy: z.enum(["owner", "dealer"], { error: "returnedBy is owner or dealer." }),
  ownerId: text(64, "ownerId names an owner on record.").nullish(),
  owner: ownerInput.nullish(),
  dealerCode: text(32, "dealerCode is a dealer's code.").nullish(),
  receivedOn: text(32, "Give the day it arrived as YYYY-MM-DD.").nullish(),
});
export type CaseIntakeBody = z.output<typeof caseIntakeBody>;
