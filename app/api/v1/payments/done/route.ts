// Where the owner lands after the payment page: a short word of thanks, or of what to do next.
// It reads nothing and writes nothing: the payment itself is recorded by the signed webhook alone.
import { z } from "zod";
import { publicGetRoute } from "@/lib/auth/guard";
import { escapeHtml } from "@/lib/mail/templates";

const query = z.object({ case: z.string().max(40).optional(), result: z.enum(["paid", "not-paid"]).optional() });

export const GET = publicGetRoute(query, async ({ query: q }) => {
  const ref = q.case ? ` (your case ${escapeHtml(q.case)})` : "";
  const text =
    q.result === "paid"
      ? `<h1>Thank you</h1><p>Your payment${ref} is on its way to the workshop. We start the repair as soon as the payment service confirms it, and write to you when your speaker is on its way back.</p>`
      : `<h1>Nothing was paid</h1><p>You left the payment page without paying${ref}. The link in our message still works; reply to it with any question.</p>`;
  return new Response(`<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Twinleaf service</title></head><body>${text}<p>Twinleaf service desk</p></body></html>`, {
    headers: { "content-type": "text/html; charset=utf-8" },
  });
});
