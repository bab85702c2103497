import { z } from "zod";
import { measure } from "@/lib/input/numbers";

/** The case and the place of the pair a form acts on; checked again in lib/service against the register. */
const place = {
  code: z.string().trim().min(1, "The case did not come through; reload the page.").max(40),
  side: z.string().trim().min(1, "Choose the side.").max(4),
  position: z.string().trim().min(1, "Choose the position.").max(10),
};
const weight = measure(z.number({ error: "A weight is a number from 0 to 10." }).min(0, "At least 0.").max(10, "At most 10.").nullable(), { empty: null }).transform((n) => n ?? 0);

export const reserveSchema = z.object({
  ...place,
  serial: z.string().trim().min(1, "Type or scan the serial of the part to reserve.").max(60, "A serial is at most 60 characters."),
  fsWeight: weight,
  qtsWeight: weight,
});

export const reserveSetSchema = z.object({
  ...place,
  left: z.string().trim().min(1, "Give the part for the left speaker.").max(60),
  right: z.string().trim().min(1, "Give the part for the right speaker.").max(60),
  fsWeight: weight,
  qtsWeight: weight,
});

export const releaseSchema = z.object({ ...place, serial: z.string().trim().min(1).max(60) });

export const fitSchema = z.object({
  ...place,
  disposition: z.enum(["failed", "returned_to_maker", "scrapped"], { error: "Choose what becomes of the part taken out." }),
  reason: z.string().trim().min(1, "Say why it comes out (what was found).").max(500, "At most 500 characters."),
});

export const repairedSchema = z.object(place);
