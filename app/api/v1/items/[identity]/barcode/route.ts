import { z } from "zod";
import { getDb } from "@/db";
import { AppError } from "@/lib/auth/errors";
import { appBaseUrl, guardedRoute } from "@/lib/auth/guard";
import { itemsWithNames } from "@/lib/genealogy/queries";
import { renderBarcode, SYMBOLOGIES } from "@/lib/labels/barcodes";
import { barcodeText, defaultSymbology } from "@/lib/labels/for-item";

const query = z.object({
  symbology: z.enum(SYMBOLOGIES as [string, ...string[]], { error: `symbology is one of ${SYMBOLOGIES.join(", ")}.` }).optional(),
  format: z.enum(["png", "svg"], { error: "format is png or svg." }).default("png"),
});

/** An item's barcode as PNG or SVG (viewing only; printing a label is POST /api/v1/labels and is recorded). */
export const GET = guardedRoute("register.read", { query }, async ({ params, query }) => {
  const identity = String(params.identity ?? "") // decoded once by Next, checked by guardedRoute;
  const [details] = await itemsWithNames(getDb(), [identity]);
  if (!details) throw new AppError(404, "No item with that serial.");
  const symbology = (query.symbology ?? defaultSymbology(details.item.kind)) as (typeof SYMBOLOGIES)[number];
  const text = barcodeText(details, symbology, await appBaseUrl());
  const headers = { "cache-control": "private, max-age=300", "x-content-type-options": "nosniff" };
  if (query.format === "svg") {
    return new Response(renderBarcode({ symbology, text, format: "svg" }), { headers: { ...headers, "content-type": "image/svg+xml" } });
  }
  const png = await renderBarcode({ symbology, text, format: "png" });
  return new Response(new Uint8Array(png), { headers: { ...headers, "content-type": "image/png" } });
});
