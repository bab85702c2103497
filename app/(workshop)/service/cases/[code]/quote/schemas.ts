import { z } from "zod";
import { stringList } from "@/lib/forms";

/**
 * Shared by the quote form and its action. The lines come as parallel lists (one entry per row of
 * the form); what a price means is read by lib/payments (parseMoney), which answers per field as
 * "lines.<row>.unitPrice".
 */
const code = z.string({ error: "The case did not come through; reload the page." }).trim().min(1, "The case did not come through; reload the page.").max(40);
const cells = (max: number) => stringList(z.string().max(max, `At most ${max} characters.`)).pipe(z.array(z.string()).max(30, "At most 30 lines."));

export const quoteSchema = z.object({
  code,
  kind: stringList(z.enum(["part", "labour"], { error: "Choose part or labour." })),
  description: cells(200),
  quantity: cells(10),
  unitPrice: cells(20),
});

export const sendLinkSchema = z.object({ code });

/** Rows of an empty quote form. */
export const QUOTE_ROWS = 5;
