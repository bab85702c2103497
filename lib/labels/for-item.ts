import { AppError } from "@/lib/auth/errors";
import { cartonElementString } from "@/lib/serials";
import type { ItemWithNames } from "@/lib/genealogy/queries";
import { KIND_LABEL } from "@/lib/vocabulary/item-kinds";
import type { Symbology } from "./barcodes";
import type { LabelSpec } from "./sheets";

const SIDE: Record<string, string> = { L: "left", R: "right" };

/**
 * The symbology each kind carries by default: GS1-128 with GTIN and serial on cartons (what a
 * dealer's warehouse scans), Data Matrix on small parts and cabinets (small, survives lacquer
 * overspray and curved surfaces: common practice), Code 128 on speakers and pairs.
 */
export function defaultSymbology(kind: string): Symbology {
  if (kind === "carton") return "gs1-128";
  if (kind === "speaker" || kind === "pair" || kind === "shipment") return "code128";
  return "datamatrix";
}

/** What the barcode of an item encodes for a symbology: the serial, or for GS1-128 the carton's element string. */
export function barcodeText(details: ItemWithNames, symbology: Symbology, baseUrl: string): string {
  const { item, model } = details;
  if (symbology === "qrcode") return `${baseUrl}/register/items/${encodeURIComponent(item.identity)}`;
  if (symbology !== "gs1-128") return item.identity;
  if (item.kind !== "carton" || !model) throw new AppError(400, "GS1-128 labels are for cartons of a model with a GTIN.");
  try {
    // The GTIN written on the carton when it was packed (the pair's model version), else the model's.
    const packed = (item.attrs as { gtin?: unknown } | null)?.gtin;
    return cartonElementString({ gtin: typeof packed === "string" ? packed : model.pairGtin, serial: item.identity, productionDate: item.createdAt }).bwipText;
  } catch (e) {
    throw new AppError(400, (e as Error).message);
  }
}

export function labelSpecFor(details: ItemWithNames, symbology: Symbology, baseUrl: string): LabelSpec {
  const { item, model, finish, dealer } = details;
  const side = typeof item.attrs.side === "string" ? SIDE[item.attrs.side] : undefined;
  const title = [KIND_LABEL[item.kind] ?? item.kind, side, item.partType].filter(Boolean).join(" · ");
  // A trim part's label names its supplier's lot, so the lot can be read off the part on the bench.
  const lot = item.kind === "trim_part" && typeof item.attrs.lot === "string" ? `supplier's lot ${item.attrs.lot}` : null;
  const lines = [model ? `${model.code} ${model.name}` : null, finish?.name, lot, dealer ? `for ${dealer.name}` : null].filter((l): l is string => Boolean(l));
  return { title, serial: item.identity, lines, barcode: { symbology, text: barcodeText(details, symbology, baseUrl) } };
}
