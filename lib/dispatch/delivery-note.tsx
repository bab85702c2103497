import "server-only";
import { Document, Image as PdfImage, Page, Text, View, renderToBuffer } from "@react-pdf/renderer";
import { sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { AppError } from "@/lib/auth/errors";
import { itemByIdentity } from "@/lib/genealogy/graph";
import { renderBarcode } from "@/lib/labels/barcodes";
import { MONO_FONT, TEXT_FONT, registerPdfFonts } from "@/lib/labels/fonts";
import { paths } from "@/lib/paths";
import { normaliseScan, parseSerial } from "@/lib/serials/format";
import { isCalendarDay, noonUtc } from "./dates";
import { dealerLines, workshopParty, type Party } from "./workshop";

export interface DeliveryNoteCarton {
  carton: string;
  sscc: string | null;
  pair: string | null;
  /** The speakers inside: both for a pair, one for a service return of one speaker. */
  speakers: string[];
  model: string;
}

export interface DeliveryNoteData {
  shipment: string;
  shipmentId: string;
  supplier: Party;
  dealer: Party;
  dealerCode: string;
  /** YYYY-MM-DD. */
  shippedOn: string;
  carrier: string;
  tracking: string;
  cartons: DeliveryNoteCarton[];
  /** The shipment's page in the register, absolute (from APP_URL), for the QR code. */
  url: string;
}

/** What a shipment's delivery note prints, read from the register; 404 for an unknown shipment. */
export async function deliveryNoteData(db: DbOrTx, shipmentText: string, opts: { baseUrl: string }): Promise<DeliveryNoteData> {
  const t = normaliseScan(shipmentText);
  const parsed = parseSerial(t);
  const shipment = t ? await itemByIdentity(db, parsed?.valid ? parsed.canonical : t) : null;
  if (!shipment || shipment.kind !== "shipment") throw new AppError(404, `${shipmentText.trim() || "That"} is not a shipment in the register.`);
  const [head] = await db.all<{ code: string; name: string; address: string; postcode: string; city: string; country: string; shipped_on: string; carrier: string; tracking: string }>(sql`
    SELECT d.code, d.name, d.address, d.postcode, d.city, d.country, sd.shipped_on, sd.carrier, sd.tracking
    FROM shipment_details sd JOIN dealers d ON d.id = sd.dealer_id WHERE sd.item_id = ${shipment.id}`);
  if (!head) throw new AppError(404, `${shipment.identity} has no shipping particulars, so it has no delivery note.`);
  // Each carton at its place in the shipment; a pair's speakers, or the one speaker a return carries.
  const rows = await db.all<{ carton: string; sscc: string | null; pair: string | null; pair_id: string | null; lone: string | null; model: string | null; model_code: string | null }>(sql`
    SELECT c.identity AS carton, cs.sscc, p.identity AS pair, p.id AS pair_id, json_extract(c.attrs, '$.speaker') AS lone,
           m.name AS model, m.code AS model_code
    FROM links sl
    JOIN items c ON c.id = sl.child_id AND c.kind = 'carton'
    LEFT JOIN carton_ssccs cs ON cs.carton_id = c.id
    LEFT JOIN links pl ON pl.parent_id = c.id AND pl.position = 'PAIR' AND pl.started_at <= sl.started_at AND (pl.ended_at IS NULL OR pl.ended_at > sl.started_at)
    LEFT JOIN items p ON p.id = pl.child_id
    LEFT JOIN models m ON m.id = c.model_id
    WHERE sl.parent_id = ${shipment.id}
    ORDER BY CAST(sl.position AS INTEGER)`);
  const cartons: DeliveryNoteCarton[] = [];
  for (const r of rows) {
    const speakers = r.pair_id
      ? (await db.all<{ identity: string }>(sql`SELECT identity FROM links l JOIN items s ON s.id = l.child_id WHERE l.parent_id = ${r.pair_id} AND l.position IN ('L', 'R') AND l.ended_at IS NULL ORDER BY l.position`)).map((s) => s.identity)
      : r.lone
        ? [r.lone]
        : [];
    cartons.push({ carton: r.carton, sscc: r.sscc, pair: r.pair, speakers, model: [r.model_code, r.model].filter(Boolean).join(" ") });
  }
  return {
    shipment: shipment.identity,
    shipmentId: shipment.id,
    supplier: workshopParty(),
    dealer: { name: head.name, lines: dealerLines(head) },
    dealerCode: head.code,
    shippedOn: head.shipped_on,
    carrier: head.carrier,
    tracking: head.tracking,
    cartons,
    url: `${opts.baseUrl.replace(/\/+$/, "")}${paths.item(shipment.identity)}`,
  };
}

const INK = "#1c2421";
const SOFT_INK = "#46524d";
const LEAF = "#2e6a57";

const longDay = (day: string) => (isCalendarDay(day) ? new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "long", year: "numeric", timeZone: "UTC" }).format(noonUtc(day)) : day);

/**
 * The delivery note: one A4 page (more when the cartons run over) with the workshop, the dealer's
 * address, the shipment's day, carrier and tracking, each carton with its SSCC and what is inside,
 * the totals, and a QR code to the shipment in the register.
 */
export async function renderDeliveryNote(data: DeliveryNoteData): Promise<Buffer> {
  registerPdfFonts();
  const qr = await renderBarcode({ symbology: "qrcode", text: data.url, format: "png", scale: 4 });
  const pairs = data.cartons.filter((c) => c.pair && c.speakers.length === 2).length;
  const speakers = data.cartons.reduce((n, c) => n + c.speakers.length, 0);
  const party = (title: string, p: Party) => (
    <View style={{ width: "50%" }}>
      <Text style={{ fontSize: 8, color: SOFT_INK }}>{title}</Text>
      <Text style={{ fontSize: 11, fontWeight: 700 }}>{p.name}</Text>
      {p.lines.map((l) => (
        <Text key={l} style={{ fontSize: 10 }}>
          {l}
        </Text>
      ))}
    </View>
  );
  const cell = (w: string, children: string, mono = false, head = false) => (
    <Text style={{ width: w, fontSize: head ? 8 : 9, color: head ? SOFT_INK : INK, ...(mono ? { fontFamily: MONO_FONT } : {}), paddingRight: 4 }}>{children}</Text>
  );
  const doc = (
    <Document title={`Delivery note ${data.shipment}`} creator="Twinleaf" producer="Twinleaf">
      <Page size="A4" style={{ fontFamily: TEXT_FONT, color: INK, padding: 40, fontSize: 10 }}>
        <View style={{ flexDirection: "row", justifyContent: "space-between", alignItems: "flex-start" }}>
          <View>
            <Text style={{ fontSize: 9, fontWeight: 700, color: LEAF, letterSpacing: 1 }}>TWINLEAF</Text>
            <Text style={{ fontSize: 20, fontWeight: 700 }}>Delivery note</Text>
            <Text style={{ fontFamily: MONO_FONT, fontSize: 11 }}>{data.shipment}</Text>
          </View>
          <PdfImage src={{ data: qr, format: "png" }} style={{ width: 70, height: 70 }} />
        </View>
        <View style={{ flexDirection: "row", marginTop: 16 }}>
          {party("From", data.supplier)}
          {party("Deliver to", data.dealer)}
        </View>
        <View style={{ flexDirection: "row", marginTop: 14, borderTopWidth: 0.8, borderTopColor: INK, paddingTop: 6 }}>
          <View style={{ width: "33%" }}>
            <Text style={{ fontSize: 8, color: SOFT_INK }}>Shipped on</Text>
            <Text>{longDay(data.shippedOn)}</Text>
          </View>
          <View style={{ width: "33%" }}>
            <Text style={{ fontSize: 8, color: SOFT_INK }}>Carrier</Text>
            <Text>{data.carrier}</Text>
          </View>
          <View style={{ width: "34%" }}>
            <Text style={{ fontSize: 8, color: SOFT_INK }}>Tracking number</Text>
            {/* The text face: a tracking number is typed and may hold spaces, which react-pdf cannot lay out in the mono face. */}
            <Text>{data.tracking}</Text>
          </View>
        </View>
        <View style={{ marginTop: 16, flexDirection: "row", borderBottomWidth: 0.8, borderBottomColor: INK, paddingBottom: 3 }}>
          {cell("6%", "No.", false, true)}
          {cell("26%", "SSCC", false, true)}
          {cell("24%", "Carton and model", false, true)}
          {cell("44%", "Pair and speakers", false, true)}
        </View>
        {data.cartons.map((c, i) => (
          <View key={c.carton} wrap={false} style={{ flexDirection: "row", borderBottomWidth: 0.4, borderBottomColor: SOFT_INK, paddingVertical: 4 }}>
            {cell("6%", String(i + 1))}
            {cell("26%", c.sscc ?? "none recorded", Boolean(c.sscc))}
            <View style={{ width: "24%", paddingRight: 4 }}>
              <Text style={{ fontFamily: MONO_FONT, fontSize: 9 }}>{c.carton}</Text>
              <Text style={{ fontSize: 9 }}>{c.model}</Text>
            </View>
            <View style={{ width: "44%" }}>
              <Text style={{ fontFamily: MONO_FONT, fontSize: 9 }}>{c.pair ?? "—"}</Text>
              {c.speakers.map((s) => (
                <Text key={s} style={{ fontFamily: MONO_FONT, fontSize: 8, color: SOFT_INK }}>
                  {s}
                </Text>
              ))}
              {c.speakers.length === 1 ? <Text style={{ fontSize: 8, color: SOFT_INK }}>One speaker only</Text> : null}
            </View>
          </View>
        ))}
        <View style={{ marginTop: 10 }}>
          <Text style={{ fontWeight: 700 }}>
            {`Total: ${data.cartons.length} carton${data.cartons.length === 1 ? "" : "s"}, ${pairs} matched pair${pairs === 1 ? "" : "s"}, ${speakers} speaker${speakers === 1 ? "" : "s"}`}
          </Text>
        </View>
        <View style={{ marginTop: 14, borderWidth: 1.2, borderColor: INK, padding: 6 }}>
          <Text style={{ fontWeight: 700 }}>Heavy: two-person lift</Text>
          <Text style={{ fontSize: 9 }}>Each carton holds loudspeakers that are heavy for one person. Lift with two people or a lifting aid, and follow your site&apos;s handling rules.</Text>
        </View>
        <Text style={{ fontSize: 8, color: SOFT_INK, marginTop: 10 }}>Check each carton&apos;s SSCC against its label on arrival. Scan the code to open this shipment in the register.</Text>
      </Page>
    </Document>
  );
  return renderToBuffer(doc);
}

/** A shipment's delivery note as a PDF, from the register. */
export async function deliveryNotePdf(db: DbOrTx, shipment: string, opts: { baseUrl: string }): Promise<Buffer> {
  return renderDeliveryNote(await deliveryNoteData(db, shipment, opts));
}
