// A local stand-in for the payment provider, for the demo and the tests: it speaks the part of the
// provider's HTTP API Twinleaf uses (form-encoded POST /v1/checkout/sessions, GET one, POST
// /v1/refunds; Bearer key; errors in the provider's JSON shape), serves a page where a person
// "pays" a session, and then POSTs the webhook event signed the way the provider signs
// (`Stripe-Signature: t=…,v1=HMAC-SHA256(secret, "t.payload")`). Its state is a JSON file, so a
// restarted demo still knows its sessions. No card is ever asked for: it is not a payment service.
import { createHmac, randomBytes } from "node:crypto";
import { mkdirSync, readFileSync, renameSync, writeFileSync } from "node:fs";
import { createServer, type IncomingMessage, type Server, type ServerResponse } from "node:http";
import type { AddressInfo } from "node:net";
import { dirname } from "node:path";

export interface StandInOptions {
  /** 0 (or left out): a free port. */
  port?: number;
  host?: string;
  /** Where its state is kept, e.g. data/fake-payments.json. */
  stateFile: string;
  /** The only API key it accepts (Bearer). */
  secretKey: string;
  /** The webhook signing secret, shared with the app's STRIPE_WEBHOOK_SECRET. */
  webhookSecret: string;
  /** Where it POSTs events: the app's /api/v1/payments/webhook. */
  webhookUrl: string;
}

interface LineItem {
  description: string;
  quantity: number;
  unit_amount: number;
  amount_total: number;
  currency: string;
}

export interface StandInSession {
  id: string;
  object: "checkout.session";
  mode: "payment";
  status: "open" | "complete" | "expired";
  payment_status: "unpaid" | "paid";
  amount_total: number;
  currency: string;
  customer_email: string | null;
  client_reference_id: string | null;
  metadata: Record<string, string>;
  payment_intent: string | null;
  success_url: string;
  cancel_url: string;
  url: string | null;
  created: number;
  livemode: false;
  /** The stand-in's own record of the lines (the real API lists them at another address). */
  line_items_summary: LineItem[];
}

export interface StandInRefund {
  id: string;
  object: "refund";
  amount: number;
  currency: string;
  payment_intent: string;
  charge: string;
  status: "succeeded";
  reason: string | null;
  metadata: Record<string, string>;
  created: number;
}

export interface StandInEvent {
  id: string;
  object: "event";
  api_version: string;
  created: number;
  livemode: false;
  pending_webhooks: number;
  request: { id: null; idempotency_key: null };
  type: string;
  data: { object: unknown };
}

interface State {
  sessions: Record<string, StandInSession>;
  refunds: Record<string, StandInRefund>;
  events: Record<string, StandInEvent>;
  /** Idempotency-Key → the answer first given to it. */
  idempotency: Record<string, { status: number; body: unknown }>;
  deliveries: { eventId: string; at: number; status: number | null; error?: string }[];
}

const API_VERSION = "2026-01-28.clover";

const id = (prefix: string) => `${prefix}_test_${randomBytes(12).toString("hex")}`;
const seconds = () => Math.floor(Date.now() / 1000);

/** The provider's signature header for a payload, as its docs describe it: HMAC-SHA256 over "t.payload". */
export function signPayload(payload: string, secret: string, timestamp = seconds()): string {
  const v1 = createHmac("sha256", secret).update(`${timestamp}.${payload}`, "utf8").digest("hex");
  return `t=${timestamp},v1=${v1}`;
}

/**
 * Reads the provider's form encoding ("line_items[0][price_data][unit_amount]=1200") into nested
 * objects and arrays, as the SDK writes it.
 */
export function parseProviderForm(body: string): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const [key, value] of new URLSearchParams(body)) {
    const m = /^([^[\]]+)((?:\[[^[\]]*\])*)$/.exec(key);
    if (!m) continue;
    const path = [m[1]!, ...[...m[2]!.matchAll(/\[([^[\]]*)\]/g)].map((p) => p[1]!)];
    // A key that would reach an object's prototype is dropped whole.
    if (path.some((part) => ["__proto__", "constructor", "prototype"].includes(part))) continue;
    let node: Record<string, unknown> = out;
    path.forEach((part, i) => {
      if (i === path.length - 1) node[part] = value;
      else node = (node[part] ??= {}) as Record<string, unknown>;
    });
  }
  return out;
}

/** An object with keys "0", "1"… (what the form encoding gives for an array) as an array. */
function listOf(v: unknown): unknown[] {
  if (!v || typeof v !== "object") return [];
  return Object.keys(v)
    .filter((k) => /^\d+$/.test(k))
    .sort((a, b) => Number(a) - Number(b))
    .map((k) => (v as Record<string, unknown>)[k]);
}

class ApiError extends Error {
  constructor(
    public status: number,
    message: string,
    public type = "invalid_request_error",
    public param?: string,
    public code?: string,
  ) {
    super(message);
  }
  body() {
    return { error: { type: this.type, message: this.message, ...(this.param ? { param: this.param } : {}), ...(this.code ? { code: this.code } : {}) } };
  }
}

const whole = (v: unknown, param: string, min: number): number => {
  if (typeof v !== "string" || !/^\d+$/.test(v) || Number(v) < min || !Number.isSafeInteger(Number(v))) throw new ApiError(400, `Invalid integer: ${String(v)}`, "invalid_request_error", param);
  return Number(v);
};

const esc = (s: string) => s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);

function money(minor: number, currency: string): string {
  const code = currency.toUpperCase();
  const exponent = new Intl.NumberFormat("en", { style: "currency", currency: code }).resolvedOptions().maximumFractionDigits ?? 2;
  const s = String(minor).padStart(exponent + 1, "0");
  const plain = exponent ? `${s.slice(0, -exponent)}.${s.slice(-exponent)}` : s;
  return new Intl.NumberFormat("en-GB", { style: "currency", currency: code }).format(plain as unknown as number);
}

export interface PaymentStandIn {
  port: number;
  /** Its base URL, e.g. http://127.0.0.1:41234 (what STRIPE_API_BASE is set to). */
  url: string;
  /** Pays a session as the page's button does, and delivers its webhook. */
  pay(sessionId: string): Promise<StandInEvent>;
  /** Delivers an event again, signed afresh (the provider retries until it gets a 2xx). */
  redeliver(eventId: string): Promise<number | null>;
  session(sessionId: string): StandInSession | undefined;
  state(): Readonly<State>;
  close(): Promise<void>;
}

export async function startPaymentStandIn(opts: StandInOptions): Promise<PaymentStandIn> {
  let state: State = { sessions: {}, refunds: {}, events: {}, idempotency: {}, deliveries: [] };
  try {
    state = { ...state, ...(JSON.parse(readFileSync(opts.stateFile, "utf8")) as State) };
  } catch {
    // No file yet, or an unreadable one: start empty.
  }
  mkdirSync(dirname(opts.stateFile), { recursive: true });
  const save = () => {
    const tmp = `${opts.stateFile}.tmp`;
    writeFileSync(tmp, JSON.stringify(state, null, 1));
    renameSync(tmp, opts.stateFile);
  };

  let base = "";

  async function deliver(event: StandInEvent): Promise<number | null> {
    const payload = JSON.stringify(event);
    let status: number | null = null;
    let error: string | undefined;
    for (let attempt = 0; attempt < 3; attempt++) {
      try {
        const res = await fetch(opts.webhookUrl, {
          method: "POST",
          headers: { "content-type": "application/json; charset=utf-8", "stripe-signature": signPayload(payload, opts.webhookSecret), "user-agent": "Twinleaf payment stand-in" },
          body: payload,
          signal: AbortSignal.timeout(15_000),
        });
        status = res.status;
        await res.text();
        error = undefined;
        if (res.ok) break;
      } catch (e) {
        error = e instanceof Error ? e.message : String(e);
      }
      await new Promise((r) => setTimeout(r, 300 * (attempt + 1)));
    }
    state.deliveries.push({ eventId: event.id, at: Date.now(), status, ...(error ? { error } : {}) });
    save();
    return status;
  }

  function newEvent(type: string, object: unknown): StandInEvent {
    const event: StandInEvent = { id: id("evt"), object: "event", api_version: API_VERSION, created: seconds(), livemode: false, pending_webhooks: 1, request: { id: null, idempotency_key: null }, type, data: { object } };
    state.events[event.id] = event;
    save();
    return event;
  }

  async function pay(sessionId: string): Promise<StandInEvent> {
    const s = state.sessions[sessionId];
    if (!s) throw new ApiError(404, `No such checkout.session: '${sessionId}'`, "invalid_request_error", "id", "resource_missing");
    if (s.status !== "open") throw new ApiError(400, "This checkout session is no longer open.", "invalid_request_error", undefined, "checkout_session_not_open");
    s.status = "complete";
    s.payment_status = "paid";
    s.payment_intent = id("pi");
    s.url = null;
    const event = newEvent("checkout.session.completed", { ...s });
    await deliver(event);
    return event;
  }

  function createSession(form: Record<string, unknown>): StandInSession {
    if (form.mode !== "payment") throw new ApiError(400, "Only mode=payment is supported by this stand-in.", "invalid_request_error", "mode");
    for (const p of ["success_url", "cancel_url"] as const) {
      if (typeof form[p] !== "string" || !/^https?:\/\//.test(form[p] as string)) throw new ApiError(400, `Missing required param: ${p}.`, "invalid_request_error", p, "parameter_missing");
    }
    const lines = listOf(form.line_items).map((raw, i): LineItem => {
      const l = raw as Record<string, Record<string, unknown> | undefined>;
      const pd = l.price_data as Record<string, unknown> | undefined;
      if (!pd) throw new ApiError(400, "Each line item needs price_data.", "invalid_request_error", `line_items[${i}][price_data]`, "parameter_missing");
      const currency = String(pd.currency ?? "").toLowerCase();
      if (!/^[a-z]{3}$/.test(currency)) throw new ApiError(400, "Invalid currency.", "invalid_request_error", `line_items[${i}][price_data][currency]`);
      const name = (pd.product_data as Record<string, unknown> | undefined)?.name;
      if (typeof name !== "string" || !name.trim()) throw new ApiError(400, "Missing required param: product_data[name].", "invalid_request_error", `line_items[${i}][price_data][product_data][name]`, "parameter_missing");
      const unit = whole(pd.unit_amount, `line_items[${i}][price_data][unit_amount]`, 0);
      const quantity = whole(l.quantity, `line_items[${i}][quantity]`, 1);
      return { description: name, quantity, unit_amount: unit, amount_total: unit * quantity, currency };
    });
    if (!lines.length) throw new ApiError(400, "Missing required param: line_items.", "invalid_request_error", "line_items", "parameter_missing");
    if (new Set(lines.map((l) => l.currency)).size !== 1) throw new ApiError(400, "All line items must use the same currency.", "invalid_request_error", "line_items");
    const sessionId = id("cs");
    const metadata = Object.fromEntries(Object.entries((form.metadata as Record<string, string> | undefined) ?? {}).map(([k, v]) => [k, String(v)]));
    const s: StandInSession = {
      id: sessionId,
      object: "checkout.session",
      mode: "payment",
      status: "open",
      payment_status: "unpaid",
      amount_total: lines.reduce((a, l) => a + l.amount_total, 0),
      currency: lines[0]!.currency,
      customer_email: typeof form.customer_email === "string" ? form.customer_email : null,
      client_reference_id: typeof form.client_reference_id === "string" ? form.client_reference_id : null,
      metadata,
      payment_intent: null,
      success_url: form.success_url as string,
      cancel_url: form.cancel_url as string,
      url: `${base}/pay/${sessionId}`,
      created: seconds(),
      livemode: false,
      line_items_summary: lines,
    };
    state.sessions[sessionId] = s;
    save();
    return s;
  }

  function createRefund(form: Record<string, unknown>): StandInRefund {
    const intent = form.payment_intent;
    if (typeof intent !== "string") throw new ApiError(400, "Missing required param: payment_intent.", "invalid_request_error", "payment_intent", "parameter_missing");
    const s = Object.values(state.sessions).find((x) => x.payment_intent === intent);
    if (!s) throw new ApiError(404, `No such payment_intent: '${intent}'`, "invalid_request_error", "payment_intent", "resource_missing");
    if (Object.values(state.refunds).some((r) => r.payment_intent === intent)) {
      throw new ApiError(400, `Charge for ${intent} has already been refunded.`, "invalid_request_error", undefined, "charge_already_refunded");
    }
    const refund: StandInRefund = {
      id: id("re"),
      object: "refund",
      amount: s.amount_total,
      currency: s.currency,
      payment_intent: intent,
      charge: `ch_${intent.slice(3)}`,
      status: "succeeded",
      reason: typeof form.reason === "string" ? form.reason : null,
      metadata: Object.fromEntries(Object.entries((form.metadata as Record<string, string> | undefined) ?? {}).map(([k, v]) => [k, String(v)])),
      created: seconds(),
    };
    state.refunds[refund.id] = refund;
    save();
    return refund;
  }

  async function readBody(req: IncomingMessage): Promise<string> {
    const chunks: Buffer[] = [];
    let size = 0;
    for await (const chunk of req) {
      size += (chunk as Buffer).length;
      if (size > 256 * 1024) throw new ApiError(413, "Request too large.");
      chunks.push(chunk as Buffer);
    }
    return Buffer.concat(chunks).toString("utf8");
  }

  const sendJson = (res: ServerResponse, status: number, body: unknown) => {
    res.writeHead(status, { "content-type": "application/json", "request-id": id("req") });
    res.end(JSON.stringify(body));
  };
  const sendHtml = (res: ServerResponse, status: number, title: string, body: string) => {
    res.writeHead(status, { "content-type": "text/html; charset=utf-8", "content-security-policy": "default-src 'none'; style-src 'unsafe-inline'; form-action 'self' http: https:" });
    res.end(
      `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width,initial-scale=1"><title>${esc(title)}</title></head>` +
        `<body style="font:16px/1.5 system-ui,sans-serif;background:#f2f2f2;color:#222;margin:0;padding:24px"><main style="max-width:460px;margin:0 auto;background:#fff;padding:24px;border-radius:8px">` +
        `<p style="margin:0 0 12px;font-size:13px;color:#666">Payment stand-in: a test page, no money moves.</p>${body}</main></body></html>`,
    );
  };

  async function api(req: IncomingMessage, res: ServerResponse, path: string) {
    const auth = /^Bearer (.+)$/.exec(req.headers.authorization ?? "")?.[1];
    if (!auth) throw new ApiError(401, "You did not provide an API key. You need to provide your API key in the Authorization header, using Bearer auth.");
    if (auth !== opts.secretKey) throw new ApiError(401, `Invalid API Key provided: ${auth.slice(0, 8)}${"*".repeat(8)}`, "invalid_request_error", undefined, "api_key_invalid");
    const key = typeof req.headers["idempotency-key"] === "string" ? `${req.method} ${path} ${req.headers["idempotency-key"]}` : null;
    if (req.method === "POST" && key && state.idempotency[key]) {
      const seen = state.idempotency[key]!;
      return sendJson(res, seen.status, seen.body);
    }
    const status = 200;
    let body: unknown;
    let after: (() => Promise<unknown>) | null = null;
    const one = /^\/v1\/checkout\/sessions\/([A-Za-z0-9_]+)$/.exec(path);
    if (req.method === "POST" && path === "/v1/checkout/sessions") {
      body = createSession(parseProviderForm(await readBody(req)));
    } else if (req.method === "GET" && one) {
      body = state.sessions[one[1]!];
      if (!body) throw new ApiError(404, `No such checkout.session: '${one[1]}'`, "invalid_request_error", "id", "resource_missing");
    } else if (req.method === "POST" && path === "/v1/refunds") {
      const refund = createRefund(parseProviderForm(await readBody(req)));
      body = refund;
      const charge = { id: refund.charge, object: "charge", amount: refund.amount, amount_refunded: refund.amount, currency: refund.currency, payment_intent: refund.payment_intent, refunded: true, refunds: { object: "list", data: [refund] } };
      after = () => deliver(newEvent("charge.refunded", charge));
    } else {
      throw new ApiError(404, `Unrecognized request URL (${req.method}: ${path}).`);
    }
    if (key) {
      state.idempotency[key] = { status, body };
      save();
    }
    sendJson(res, status, body);
    // The provider tells the webhook after it has answered the call.
    if (after) void after();
  }

  async function page(req: IncomingMessage, res: ServerResponse, sessionId: string) {
    const s = state.sessions[sessionId];
    if (!s) return sendHtml(res, 404, "Not found", "<h1>No such payment</h1><p>This payment link is not known here.</p>");
    if (req.method === "POST") {
      if (s.status === "open") await pay(sessionId);
      res.writeHead(303, { location: s.success_url });
      return res.end();
    }
    if (s.status !== "open") return sendHtml(res, 200, "Paid", `<h1>This has been paid</h1><p>${esc(money(s.amount_total, s.currency))}, thank you.</p>`);
    const rows = s.line_items_summary
      .map((l) => `<tr><td style="padding:4px 8px 4px 0">${l.quantity} × ${esc(l.description)}</td><td style="text-align:right">${esc(money(l.amount_total, l.currency))}</td></tr>`)
      .join("");
    sendHtml(
      res,
      200,
      `Pay ${money(s.amount_total, s.currency)}`,
      `<h1 style="font-size:22px">Pay ${esc(money(s.amount_total, s.currency))}</h1>` +
        (s.client_reference_id ? `<p>Reference ${esc(s.client_reference_id)}</p>` : "") +
        `<table style="border-collapse:collapse;margin:0 0 16px">${rows}</table>` +
        `<form method="post" action="/pay/${esc(s.id)}"><button type="submit" data-testid="stand-in-pay" style="min-height:48px;padding:0 24px;font-size:16px;background:#1f3b2c;color:#fff;border:0;border-radius:6px">Pay ${esc(money(s.amount_total, s.currency))}</button></form>` +
        `<p><a href="${esc(s.cancel_url)}">Go back without paying</a></p>`,
    );
  }

  const server: Server = createServer((req, res) => {
    const path = new URL(req.url ?? "/", "http://stand-in").pathname;
    const run = async () => {
      const pay = /^\/pay\/([A-Za-z0-9_]+)$/.exec(path);
      if (pay && (req.method === "GET" || req.method === "POST")) return page(req, res, pay[1]!);
      return api(req, res, path);
    };
    run().catch((e: unknown) => {
      if (res.headersSent) return res.end();
      if (e instanceof ApiError) return sendJson(res, e.status, e.body());
      console.error("payment stand-in:", e);
      sendJson(res, 500, { error: { type: "api_error", message: "The stand-in failed." } });
    });
  });
  await new Promise<void>((ok, fail) => {
    server.once("error", fail);
    server.listen(opts.port ?? 0, opts.host ?? "127.0.0.1", () => ok());
  });
  const port = (server.address() as AddressInfo).port;
  base = `http://${opts.host ?? "127.0.0.1"}:${port}`;
  return {
    port,
    url: base,
    pay,
    redeliver: async (eventId) => {
      const e = state.events[eventId];
      if (!e) throw new Error(`no event ${eventId}`);
      return deliver(e);
    },
    session: (sessionId) => state.sessions[sessionId],
    state: () => state,
    close: () => new Promise<void>((ok) => server.close(() => ok())),
  };
}
