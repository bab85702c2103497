import { z } from "zod";
import { CASE_STATES } from "@/lib/vocabulary/case-states";

const field = (max: number, message: string) => z.string({ error: message }).max(max, message).default("");

export const moveFormSchema = z.object({
  code: field(40, "The case is not named."),
  from: z.enum(CASE_STATES, { error: "The page is out of date: reload it." }),
  to: z.enum(CASE_STATES, { error: "Choose what the case becomes." }),
  reason: field(500, "Keep the reason to 500 characters."),
});

export const findingFormSchema = z.object({
  code: field(40, "The case is not named."),
  side: z.enum(["L", "R"], { error: "Choose the left or the right speaker." }),
  position: field(8, "Choose a position."),
  finding: field(500, "Keep the finding to 500 characters."),
});
