import { Document, G, type Styles, Image, Line, Page, Path, Polygon, Rect, Svg, Text, View, renderToBuffer } from "@react-pdf/renderer";
import type { ReactNode } from "react";
import { renderBarcode } from "@/lib/labels/barcodes";
import { CERT_MONO_FONT as MONO_FONT, CERT_TEXT_FONT as TEXT_FONT, registerCertificateFonts } from "./fonts";
import type { Side } from "@/lib/vocabulary/sides";
import type { CertificateData, FinalTestFigure, PositionRow, Replacement, TrimRow, VeneerOrigin } from "./data";
import { bandLabel, formatDb, formatHz } from "./figures";
import { formatLongDate, formatMonthYear } from "@/lib/format";

// Twinleaf's palette (app/globals.css).
const PAPER = "#f6f3ec";
const INK = "#1d2326";
const SOFT = "#4f585c";
const LINE = "#d6cfc2";
const LINE_STRONG = "#a89f90";
const LEAF = "#2e6a57";
const LEAF_SOFT = "#e2eee8";
const WALNUT = "#7b4f32";
const WALNUT_SOFT = "#f3e8de";

/** Serials, codes and the link: monospaced, so like characters line up and none is misread. */
function Mono({ children, style }: { children: string; style?: Styles[string] }) {
  return <Text style={{ fontFamily: MONO_FONT, ...style }}>{children}</Text>;
}

/** Plex Mono advances every glyph 600/1000 em. */
const MONO_ADVANCE = 0.6;
const fitMono = (text: string, widthPt: number, max: number, min = 5) => Math.max(min, Math.min(max, widthPt / (MONO_ADVANCE * Math.max(1, text.length))));

const PAGE_W = 595.28;
const MARGIN_X = 36;
const CONTENT_W = PAGE_W - 2 * MARGIN_X;

// A certificate is kept for years: its dates always carry the year, in the workshop's time zone.
const longDate = formatLongDate;
const monthYear = formatMonthYear;

const PART_NAMES: Record<string, string> = { tweeter: "tweeter", midrange: "midrange", bass: "bass", crossover: "crossover" };

/**
 * Renders a pair's certificate: one A4 portrait page with the serials, the veneer origin as a
 * bookmatch diagram, the parts and their match, the final responses as a vector chart, the
 * signatures and a QR code to the public verify link. A copy is marked COPY.
 */
export async function renderCertificate(data: CertificateData): Promise<Buffer> {
  registerCertificateFonts();
  // Scale 4: 8 pixels a module, so the printed code stays sharp when placed at about 29 mm.
  const qr = await renderBarcode({ symbology: "qrcode", text: data.verifyUrl, format: "png", scale: 4 });
  const doc = (
    <Document title={`Certificate of the matched pair ${data.pair.identity}${data.revision ? `, revision ${data.revision.number}` : ""}${data.copy ? " (copy)" : ""}`} author="Twinleaf" creator="Twinleaf" producer="Twinleaf">
      <Page size="A4" style={{ fontFamily: TEXT_FONT, color: INK, fontSize: 8.5, paddingHorizontal: MARGIN_X, paddingTop: 30, paddingBottom: 24 }}>
        <Header data={data} />
        <Serials data={data} />
        {data.veneer ? <Veneer veneer={data.veneer} finishCode={data.finish?.code ?? ""} /> : <Lacquer data={data} />}
        <Parts rows={data.positions} replacements={data.replacements} />
        {data.trim.length ? <Trim rows={data.trim} /> : null}
        <Responses test={data.finalTest} speakers={data.speakers} repairedAt={lastRepair(data)} height={chartHeight(data)} />
        <Footer data={data} qr={qr} />
      </Page>
    </Document>
  );
  return renderToBuffer(doc);
}

function Heading({ children }: { children: ReactNode }) {
  return (
    <View style={{ flexDirection: "row", alignItems: "center", marginTop: 9, marginBottom: 4 }}>
      <Text style={{ fontSize: 9.5, fontWeight: 700, color: LEAF }}>{children}</Text>
      <View style={{ flexGrow: 1, marginLeft: 6, borderBottomWidth: 0.5, borderBottomColor: LINE }} />
    </View>
  );
}

function finishLine(data: CertificateData): string {
  const f = data.finish;
  if (!f) return "";
  const kind = f.kind === "veneer" ? "veneer" : "lacquer";
  return `${f.name} ${kind}${f.detail ? ` (${f.detail})` : ""}`;
}

/** The latest repair, if any: the certificate then shows the pair as it is after it. */
const lastRepair = (data: Pick<CertificateData, "replacements">): Date | null => data.replacements.at(-1)?.at ?? null;

/**
 * What a copy says of the original, from where the pair stands as it is printed: only what is
 * true then (nothing about a carton before packing, nothing about shipping before it ships).
 */
export function copyNote(data: Pick<CertificateData, "issuedAt" | "originalPrintedAt" | "packed" | "shipped" | "replacements"> & { revision?: CertificateData["revision"] }): string {
  const lines = [data.revision ? `Reprint of revision ${data.revision.number} of the certificate, issued on ${longDate(data.revision.issuedAt)}.` : `Reprint of the certificate issued on ${longDate(data.issuedAt)}.`];
  const original = data.originalPrintedAt;
  if (original && data.shipped && original.getTime() <= data.shipped.at.getTime()) lines.push("The original shipped with the pair.");
  else if (original && data.packed && !data.shipped) lines.push(data.packed.carton ? `The original went into carton ${data.packed.carton} with the pair.` : "The original went into the carton with the pair.");
  else if (original) lines.push(`The original was printed on ${longDate(original)}.`);
  const repaired = lastRepair(data);
  if (repaired) lines.push(`This copy shows the pair as it is after the repair of ${longDate(repaired)}.`);
  return lines.join(" ");
}

function Header({ data }: { data: CertificateData }) {
  return (
    <View>
      <View style={{ flexDirection: "row", justifyContent: "space-between", alignItems: "flex-start" }}>
        <View>
          <Text style={{ fontSize: 8, fontWeight: 700, color: LEAF, letterSpacing: 0.8 }}>TWINLEAF</Text>
          <Text style={{ fontSize: 21, fontWeight: 700, marginTop: 3 }}>Certificate of a matched pair</Text>
          {data.revision ? <Text style={{ fontSize: 11, fontWeight: 700, color: WALNUT, marginTop: 2 }}>{`Revision ${data.revision.number}`}</Text> : null}
          <Text style={{ fontSize: 10, marginTop: 4 }}>
            {data.model.name} ({data.model.code}){data.finish ? `, ${finishLine(data)}` : ""}
          </Text>
        </View>
        {data.copy && (
          <View style={{ borderWidth: 2, borderColor: WALNUT, borderRadius: 3, paddingHorizontal: 12, paddingVertical: 4, marginTop: 4, backgroundColor: WALNUT_SOFT }}>
            <Text style={{ fontSize: 22, fontWeight: 700, color: WALNUT }}>COPY</Text>
          </View>
        )}
      </View>
      {data.copy && (
        <Text style={{ fontSize: 9, color: WALNUT, fontWeight: 700, marginTop: 4 }}>
          {copyNote(data)}
        </Text>
      )}
      <View style={{ borderBottomWidth: 1.2, borderBottomColor: LEAF, marginTop: 7 }} />
    </View>
  );
}

function SerialBox({ label, serial, width, max }: { label: string; serial: string; width: number; max: number }) {
  const inner = width - 16;
  return (
    <View style={{ width, backgroundColor: PAPER, borderWidth: 0.6, borderColor: LINE, borderRadius: 2, paddingHorizontal: 8, paddingVertical: 6 }}>
      <Text style={{ fontSize: 7.5, color: SOFT }}>{label}</Text>
      <Mono style={{ fontWeight: 600, fontSize: fitMono(serial, inner, max), marginTop: 2 }}>{serial}</Mono>
    </View>
  );
}

function Serials({ data }: { data: CertificateData }) {
  const gap = 8;
  const pairW = 205;
  const spkW = (CONTENT_W - pairW - 2 * gap) / 2;
  const built = data.builtAt ? `Built in ${monthYear(data.builtAt)}` : "Build month not recorded";
  return (
    <View style={{ marginTop: 9 }}>
      <View style={{ flexDirection: "row", justifyContent: "space-between", alignItems: "flex-end" }}>
        <SerialBox label="Pair serial" serial={data.pair.identity} width={pairW} max={18} />
        <SerialBox label="Left speaker" serial={data.speakers.L.identity} width={spkW} max={13} />
        <SerialBox label="Right speaker" serial={data.speakers.R.identity} width={spkW} max={13} />
      </View>
      <Text style={{ marginTop: 5, color: SOFT }}>
        {built} · Certificate issued on {longDate(data.issuedAt)}
        {data.revision ? ` · Revision ${data.revision.number} issued on ${longDate(data.revision.issuedAt)}` : ""}
      </Text>
      {data.revision ? (
        <Text style={{ marginTop: 3, fontWeight: 700, color: WALNUT }}>
          {`Revision ${data.revision.number}: ${data.revision.repairLine}. It takes the place of every earlier revision; the link and QR code below are this revision's own.`}
        </Text>
      ) : null}
    </View>
  );
}

// ---- veneer: the bookmatch ----------------------------------------------------------------------

const SPECIES_TINT: Record<string, string> = { WAL: "#d9c3aa", OAK: "#eadfc4", CHY: "#e9c9b0", SYC: "#f1ebdd" };

/** A small deterministic wobble per face position, so the figure of each leaf looks its own. */
const wobble = (i: number, j: number) => Math.sin(i * 2.17 + j * 1.31 + 0.4);

/**
 * Grain lines of the leaf at face index `i`, drawn in [x0, x0 + w] × [0, h]. Consecutive leaves of
 * a flitch carry nearly the same figure, so the right face's leaf at index i (the next leaf) gets
 * the same lines, mirrored.
 */
function grainPaths(i: number, x0: number, w: number, h: number): number[][][] {
  const lines: number[][][] = [];
  const n = 5;
  for (let j = 0; j < n; j++) {
    const base = x0 + ((j + 0.6) / (n + 0.2)) * w;
    const bow = (0.16 + 0.05 * j) * w * wobble(i, j);
    const lean = 0.12 * w * wobble(i + 3, j);
    // A cubic from the butt end to the top: [start, c1, c2, end] as [x, y].
    lines.push([
      [base, h],
      [base + bow, h * 0.66],
      [base - bow * 0.6 + lean, h * 0.33],
      [base + lean, 0],
    ]);
  }
  return lines;
}

const cubic = (p: number[][], mx: (x: number) => number, dy: number) =>
  `M ${mx(p[0]![0]!).toFixed(2)} ${(p[0]![1]! + dy).toFixed(2)} C ${p
    .slice(1)
    .map((q) => `${mx(q[0]!).toFixed(2)} ${(q[1]! + dy).toFixed(2)}`)
    .join(" ")}`;

function leafList(veneer: VeneerOrigin, side: Side): string {
  return veneer.faces[side].leaves.map((l) => `${l.leafNo}${l.replacement ? "*" : ""}`).join(", ");
}

function Veneer({ veneer, finishCode }: { veneer: VeneerOrigin; finishCode: string }) {
  const n = Math.max(veneer.faces.L.leaves.length, veneer.faces.R.leaves.length, 1);
  const W = 262;
  const spine = 14;
  const lw = Math.min(44, (W - spine) / (2 * n));
  const faceW = n * lw;
  const top = 4;
  const lh = 66;
  const H = top + lh + 30;
  const tint = SPECIES_TINT[finishCode] ?? "#e6dac6";
  // Left face from x = 0; the right face is its mirror image about the diagram's centre line.
  const leftX = (W - 2 * faceW - spine) / 2;
  const mirror = (x: number) => W - x;
  const same = (x: number) => x;
  const anyReplacement = (["L", "R"] as const).some((s) => veneer.faces[s].leaves.some((l) => l.replacement));

  const leaves = (["L", "R"] as const).flatMap((side) =>
    veneer.faces[side].leaves.map((leaf, i) => {
      const x = leftX + i * lw;
      const mx = side === "L" ? same : mirror;
      const lx = side === "L" ? x : mirror(x + lw);
      return { side, leaf, i, lx, paths: grainPaths(i, x, lw, lh).map((p) => cubic(p, mx, top)) };
    }),
  );

  return (
    <View wrap={false}>
      <Heading>Veneer origin</Heading>
      <View style={{ flexDirection: "row" }}>
        <View style={{ position: "relative", width: W, height: H }}>
          <Svg width={W} height={H} viewBox={`0 0 ${W} ${H}`}>
            {leaves.map(({ side, i, lx, paths }) => (
              <G key={`${side}${i}`}>
                <Rect x={lx} y={top} width={lw} height={lh} fill={tint} stroke={WALNUT} strokeWidth={0.5} />
                {paths.map((d, k) => (
                  <Path key={k} d={d} fill="none" stroke={WALNUT} strokeWidth={0.45} strokeOpacity={0.7} />
                ))}
              </G>
            ))}
            <Line x1={W / 2} y1={top - 3} x2={W / 2} y2={top + lh + 3} stroke={LEAF} strokeWidth={0.8} strokeDasharray="2 1.5" />
          </Svg>
          {leaves.map(({ side, leaf, i, lx }) => (
            <Mono key={`n${side}${i}`} style={{ position: "absolute", left: lx, top: top + lh + 2, width: lw, textAlign: "center", fontSize: 7.5 }}>
              {`${leaf.leafNo}${leaf.replacement ? "*" : ""}`}
            </Mono>
          ))}
          <Text style={{ position: "absolute", left: 0, top: top + lh + 14, width: W / 2 - 4, textAlign: "center", fontSize: 7, color: SOFT }}>Left speaker, as cut</Text>
          <Text style={{ position: "absolute", left: W / 2 + 4, top: top + lh + 14, width: W / 2 - 4, textAlign: "center", fontSize: 7, color: SOFT }}>Right speaker, turned over</Text>
        </View>
        <View style={{ marginLeft: 14, width: CONTENT_W - W - 14, paddingTop: 2 }}>
          <Text style={{ fontWeight: 700, fontSize: 9.5 }}>{veneer.species}</Text>
          {veneer.detail !== "" && <Text style={{ color: SOFT }}>{veneer.detail}</Text>}
          <Text style={{ marginTop: 4 }}>
            {veneer.flitches.length > 1 ? "Flitches " : "Flitch "}
            {veneer.flitches.map((f, i) => (
              <Text key={f}>
                {i ? ", " : ""}
                <Mono>{f}</Mono>
              </Text>
            ))}
          </Text>
          <Text style={{ marginTop: 3 }}>Left face (as cut): leaves {leafList(veneer, "L")}</Text>
          <Text>Right face (turned over): leaves {leafList(veneer, "R")}</Text>
          <Text style={{ marginTop: 4, color: SOFT, fontSize: 7.5 }}>
            Leaves are numbered in slicing order. Each leaf of the right face is the sheet cut next after its partner on the left, turned over like the
            page of a book, so the two sides mirror each other.
            {anyReplacement ? " * A leaf from the same flitch that replaced a damaged one." : ""}
          </Text>
        </View>
      </View>
    </View>
  );
}

function Lacquer({ data }: { data: CertificateData }) {
  return (
    <View>
      <Heading>Finish</Heading>
      <Text>{data.finish ? `${data.finish.name} lacquer${data.finish.detail ? `, ${data.finish.detail}` : ""}.` : "No finish recorded."} Both cabinets were finished together as one pair.</Text>
    </View>
  );
}

// ---- parts ------------------------------------------------------------------------------------

function matchText(row: PositionRow, replacements: Replacement[]): string {
  const replaced = replacements.filter((r) => r.position === row.position && (r.fitted === row.left || r.fitted === row.right));
  if (replaced.length) return `${replaced.map((r) => (r.side === "L" ? "Left" : "Right")).join(" and ")} replaced on ${longDate(replaced.at(-1)!.at)}`;
  if (!row.match) return "—";
  return `${formatDb(row.match.maxDiffDb)} dB at most, limit ${formatDb(row.match.limitDb)} dB`;
}

/** "The right speaker's tweeter (T): D-… in place of D-…, on 3 May 2027." */
function replacementLine(r: Replacement): string {
  const what = `The ${r.side === "L" ? "left" : "right"} speaker's ${PART_NAMES[r.part] ?? r.part} (${r.position})`;
  return `${what}: ${r.fitted}${r.replaced ? ` in place of ${r.replaced}` : " fitted"}, on ${longDate(r.at)}.`;
}

function Parts({ rows, replacements }: { rows: PositionRow[]; replacements: Replacement[] }) {
  const cols = [92, 118, 118, CONTENT_W - 92 - 236];
  const cell = (w: number, last = false) => ({ width: w, paddingVertical: 2.6, paddingRight: last ? 0 : 6 });
  return (
    <View wrap={false}>
      <Heading>Drive units and crossovers</Heading>
      <View style={{ flexDirection: "row", borderBottomWidth: 0.6, borderBottomColor: LINE_STRONG }}>
        {["Position", "Left speaker", "Right speaker", "Left and right matched"].map((h, i) => (
          <Text key={h} style={{ ...cell(cols[i]!, i === 3), fontSize: 7.5, color: SOFT }}>
            {h}
          </Text>
        ))}
      </View>
      {rows.map((r, k) => (
        <View key={r.position} style={{ flexDirection: "row", borderBottomWidth: 0.4, borderBottomColor: LINE, backgroundColor: k % 2 ? "#ffffff" : "#fbf9f4" }}>
          <Text style={cell(cols[0]!)}>
            <Mono style={{ fontWeight: 600 }}>{r.position}</Mono> {PART_NAMES[r.part] ?? r.part}
          </Text>
          <Mono style={cell(cols[1]!)}>{r.left ?? "—"}</Mono>
          <Mono style={cell(cols[2]!)}>{r.right ?? "—"}</Mono>
          <Text style={cell(cols[3]!, true)}>{matchText(r, replacements)}</Text>
        </View>
      ))}
      {replacements.length ? (
        <View style={{ marginTop: 3 }}>
          <Text style={{ fontSize: 7.5, color: SOFT }}>Replaced after the pair was built:</Text>
          {replacements.map((r) => (
            <Text key={`${r.side}${r.position}${r.fitted}`} style={{ fontSize: 7.5 }}>
              {replacementLine(r)}
            </Text>
          ))}
        </View>
      ) : null}
    </View>
  );
}

/** The speakers' metal trim parts: each position with both serials and their supplier's lots. */
function Trim({ rows }: { rows: TrimRow[] }) {
  const cols = [92, (CONTENT_W - 92) / 2, (CONTENT_W - 92) / 2];
  const cell = (w: number, last = false) => ({ width: w, paddingVertical: 2.6, paddingRight: last ? 0 : 6 });
  // Spaces stay out of the mono face (fontkit trips on Plex Mono's space): serials in mono, words in the text face.
  const part = (p: TrimRow["left"], w: number, last = false) => (
    <Text style={cell(w, last)}>
      {p ? (
        <>
          <Mono>{p.identity}</Mono>
          {p.lot ? (
            <>
              {", lot "}
              <Mono>{p.lot}</Mono>
            </>
          ) : null}
        </>
      ) : (
        "—"
      )}
    </Text>
  );
  return (
    <View wrap={false}>
      <Heading>Trim parts</Heading>
      <View style={{ flexDirection: "row", borderBottomWidth: 0.6, borderBottomColor: LINE_STRONG }}>
        {["Position", "Left speaker (supplier's lot)", "Right speaker (supplier's lot)"].map((h, i) => (
          <Text key={h} style={{ ...cell(cols[i]!, i === 2), fontSize: 7.5, color: SOFT }}>
            {h}
          </Text>
        ))}
      </View>
      {rows.map((r, k) => (
        <View key={r.position} style={{ flexDirection: "row", borderBottomWidth: 0.4, borderBottomColor: LINE, backgroundColor: k % 2 ? "#ffffff" : "#fbf9f4" }}>
          <Text style={cell(cols[0]!)}>{r.label}</Text>
          {part(r.left, cols[1]!)}
          {part(r.right, cols[2]!, true)}
        </View>
      ))}
    </View>
  );
}

// ---- the final responses ------------------------------------------------------------------------

const F_MIN = 20;
const F_MAX = 20000;
const MAJOR_TICKS: [number, string][] = [
  [20, "20 Hz"], [50, "50"], [100, "100"], [200, "200"], [500, "500"], [1000, "1k"], [2000, "2k"], [5000, "5k"], [10000, "10k"], [20000, "20k"],
];
const MINOR_TICKS = [1, 2, 3].flatMap((e) => [2, 3, 4, 5, 6, 7, 8, 9].map((m) => m * 10 ** e)).filter((f) => f >= F_MIN && f <= F_MAX);

/** Level at `hz` read off a sorted response, linear in log-frequency; null outside it. */
function levelAt(points: [number, number][], hz: number): number | null {
  if (points.length === 0 || hz < points[0]![0] || hz > points[points.length - 1]![0]) return null;
  let lo = 0;
  let hi = points.length - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (points[mid]![0] <= hz) lo = mid;
    else hi = mid;
  }
  const [f0, d0] = points[lo]!;
  const [f1, d1] = points[hi]!;
  if (f1 === f0) return d0;
  const t = (Math.log(hz) - Math.log(f0)) / (Math.log(f1) - Math.log(f0));
  return d0 + t * (d1 - d0);
}

/**
 * The response chart gives up height for the lines a repair adds (the copy note, one line per
 * replaced part and its heading, the note under the test), so the certificate stays one page.
 */
function chartHeight(data: CertificateData): number {
  const n = data.replacements.length;
  // The trim table takes its heading and a line per row from the chart, so the page stays one page.
  const trim = data.trim.length ? 22 + 12 * (data.trim.length + 1) : 0;
  return Math.max(90, (n ? Math.max(100, 165 - (10 * (n + 1) + 10 + 12)) : 165) - trim);
}

function Responses({ test, speakers, repairedAt, height }: { test: FinalTestFigure | null; speakers: CertificateData["speakers"]; repairedAt: Date | null; height: number }) {
  if (!test) {
    return (
      <View>
        <Heading>Final test</Heading>
        <Text>No final test is recorded for this pair.</Text>
      </View>
    );
  }
  const W = CONTENT_W;
  const H = height;
  const x0 = 30;
  const x1 = W - 8;
  const y0 = 6;
  const y1 = H - 14;
  const xOf = (hz: number) => x0 + ((Math.log10(hz) - Math.log10(F_MIN)) / (Math.log10(F_MAX) - Math.log10(F_MIN))) * (x1 - x0);

  const inView = (p: [number, number]) => p[0] >= F_MIN && p[0] <= F_MAX;
  const left = test.left.filter(inView);
  const right = test.right.filter(inView);
  const inRange = [...left, ...right].filter((p) => p[0] >= test.minHz && p[0] <= test.maxHz).map((p) => p[1]);
  const levels = inRange.length ? inRange : [...left, ...right].map((p) => p[1]);
  const lo = levels.length ? Math.min(...levels) : 80;
  const hi = levels.length ? Math.max(...levels) : 90;
  // At least 12 dB tall, so a 1 dB limit band is visible without flattening the curves.
  const span = Math.max(12, hi - lo + 4);
  const step = span <= 16 ? 2 : span <= 40 ? 5 : 10;
  const mid = (lo + hi) / 2;
  const dbLo = Math.floor((mid - span / 2) / step) * step;
  const dbHi = Math.ceil((mid + span / 2) / step) * step;
  const yOf = (db: number) => y1 - ((Math.min(dbHi, Math.max(dbLo, db)) - dbLo) / (dbHi - dbLo)) * (y1 - y0);
  const path = (pts: [number, number][]) => pts.map((p, i) => `${i ? "L" : "M"} ${xOf(p[0]).toFixed(2)} ${yOf(p[1]).toFixed(2)}`).join(" ");

  // The limit band: |L − R| ≤ limit exactly when both lie within ± limit/2 of their mean.
  const half = test.limitDb / 2;
  const grid = [...new Set([...left, ...right].map((p) => p[0]))].filter((hz) => hz >= test.minHz && hz <= test.maxHz).sort((a, b) => a - b);
  const means = grid
    .map((hz) => {
      const l = levelAt(left, hz);
      const r = levelAt(right, hz);
      return l === null || r === null ? null : ([hz, (l + r) / 2] as [number, number]);
    })
    .filter((m): m is [number, number] => m !== null);
  const band = means.length > 1
    ? [...means.map(([hz, m]) => `${xOf(hz).toFixed(2)},${yOf(m + half).toFixed(2)}`), ...[...means].reverse().map(([hz, m]) => `${xOf(hz).toFixed(2)},${yOf(m - half).toFixed(2)}`)].join(" ")
    : null;

  const dbTicks: number[] = [];
  for (let d = dbLo; d <= dbHi + 1e-9; d += step) dbTicks.push(d);
  const result = `Largest difference ${formatDb(test.maxDiffDb)} dB at ${bandLabel(test.worstBand)}; limit ${formatDb(test.limitDb)} dB: ${test.pass ? "passed" : "not passed"}`;

  return (
    <View wrap={false}>
      <Heading>Final test: left and right responses</Heading>
      <View style={{ position: "relative", width: W, height: H }}>
        <Svg width={W} height={H} viewBox={`0 0 ${W} ${H}`}>
          <Rect x={x0} y={y0} width={x1 - x0} height={y1 - y0} fill="#fffdf8" stroke={LINE_STRONG} strokeWidth={0.6} />
          {MINOR_TICKS.map((f) => (
            <Line key={`m${f}`} x1={xOf(f)} y1={y0} x2={xOf(f)} y2={y1} stroke={LINE} strokeWidth={0.3} />
          ))}
          {MAJOR_TICKS.map(([f]) => (
            <Line key={`M${f}`} x1={xOf(f)} y1={y0} x2={xOf(f)} y2={y1 + 2} stroke={LINE_STRONG} strokeWidth={0.5} />
          ))}
          {dbTicks.map((d) => (
            <Line key={`d${d}`} x1={x0 - 2} y1={yOf(d)} x2={x1} y2={yOf(d)} stroke={LINE} strokeWidth={0.4} />
          ))}
          {band && <Polygon points={band} fill={LEAF} fillOpacity={0.16} stroke="none" />}
          <Line x1={xOf(test.minHz)} y1={y0} x2={xOf(test.minHz)} y2={y1} stroke={LEAF} strokeWidth={0.5} strokeDasharray="1.5 1.5" />
          <Line x1={xOf(test.maxHz)} y1={y0} x2={xOf(test.maxHz)} y2={y1} stroke={LEAF} strokeWidth={0.5} strokeDasharray="1.5 1.5" />
          {left.length > 1 && <Path d={path(left)} fill="none" stroke={LEAF} strokeWidth={1.1} />}
          {right.length > 1 && <Path d={path(right)} fill="none" stroke={WALNUT} strokeWidth={1.1} strokeDasharray="3.5 1.6" />}
        </Svg>
        {MAJOR_TICKS.map(([f, label]) => (
          <Text key={`x${f}`} style={{ position: "absolute", left: xOf(f) - 15, top: y1 + 3, width: 30, textAlign: "center", fontSize: 6.5, color: SOFT }}>
            {label}
          </Text>
        ))}
        {dbTicks.map((d) => (
          <Text key={`y${d}`} style={{ position: "absolute", left: 0, top: yOf(d) - 4, width: x0 - 4, textAlign: "right", fontSize: 6.5, color: SOFT }}>
            {d === dbTicks[dbTicks.length - 1] ? `${d} dB` : d}
          </Text>
        ))}
      </View>
      <View style={{ flexDirection: "row", marginTop: 3, marginLeft: x0, alignItems: "center", fontSize: 7.5, color: SOFT }}>
        <Swatch kind="left" />
        <Text style={{ marginRight: 10 }}>Left <Mono>{speakers.L.identity}</Mono></Text>
        <Swatch kind="right" />
        <Text style={{ marginRight: 10 }}>Right <Mono>{speakers.R.identity}</Mono></Text>
        <Swatch kind="band" />
        <Text>
          Limit: within ±{formatDb(half)} dB of their mean, {formatHz(test.minHz)}–{formatHz(test.maxHz)}
        </Text>
      </View>
      <Text style={{ marginTop: 4, fontSize: 9.5, fontWeight: 700, color: test.pass ? LEAF : WALNUT }}>{result}</Text>
      <Text style={{ color: SOFT, fontSize: 7.5, marginTop: 1 }}>
        Measured on {longDate(test.at)}; compared band by band in one-third octaves (IEC 61260-1) over {formatHz(test.minHz)} to {formatHz(test.maxHz)}.
        {repairedAt && repairedAt.getTime() > test.at.getTime() ? ` This test was made before the repair of ${longDate(repairedAt)}.` : ""}
      </Text>
    </View>
  );
}

function Swatch({ kind }: { kind: "left" | "right" | "band" }) {
  return (
    <Svg width={16} height={7} viewBox="0 0 16 7" style={{ marginRight: 3 }}>
      {kind === "band" ? (
        <Rect x={0} y={0.5} width={16} height={6} fill={LEAF} fillOpacity={0.16} />
      ) : (
        <Line x1={0} y1={3.5} x2={16} y2={3.5} stroke={kind === "left" ? LEAF : WALNUT} strokeWidth={1.3} strokeDasharray={kind === "right" ? "3.5 1.6" : undefined} />
      )}
    </Svg>
  );
}

// ---- signatures and the QR code -----------------------------------------------------------------

function Footer({ data, qr }: { data: CertificateData; qr: Buffer }) {
  const qrW = 190;
  const qrSize = 84;
  return (
    <View wrap={false} style={{ flexDirection: "row", marginTop: 2 }}>
      <View style={{ width: CONTENT_W - qrW - 12 }}>
        <Heading>Signed off</Heading>
        {data.signatures.map((s) => (
          <View key={s.step} style={{ marginBottom: 5 }}>
            <Text>
              <Text style={{ fontWeight: 700 }}>{s.label}: </Text>
              {s.name ? (
                <Text>
                  {s.name}
                  {s.at ? `, ${longDate(s.at)}` : ""}
                </Text>
              ) : (
                <Text style={{ color: SOFT }}>{s.at ? `name not recorded, ${longDate(s.at)}` : "name not recorded"}</Text>
              )}
            </Text>
            <Text style={{ color: SOFT, fontSize: 7.5, marginTop: 1 }}>{`${s.meaning.charAt(0).toUpperCase()}${s.meaning.slice(1)}.`}</Text>
          </View>
        ))}
      </View>
      <View style={{ width: qrW, marginLeft: 12, alignItems: "center", paddingTop: 10 }}>
        <View style={{ backgroundColor: LEAF_SOFT, borderRadius: 3, padding: 6, alignItems: "center", width: qrW }}>
          <Image src={{ data: qr, format: "png" }} style={{ width: qrSize, height: qrSize }} />
          <Text style={{ fontSize: 7, marginTop: 3 }}>Check this certificate in the register:</Text>
          <Mono style={{ fontSize: fitMono(data.verifyUrl, qrW - 14, 7, 4.2), marginTop: 2 }}>{data.verifyUrl}</Mono>
        </View>
      </View>
    </View>
  );
}
