import "server-only";
// The one file of lib/auth bound to Next.js: it reads the session cookie and turns a refusal into
// a redirect, a 403 page, a form state or a JSON answer. Everything it decides comes from lib/auth.
import { revalidatePath } from "next/cache";
import { cookies, headers } from "next/headers";
import { forbidden, notFound, redirect } from "next/navigation";
import type { Cookie } from "lucia";
import { cache } from "react";
import { z } from "zod";
import { echoPlan, echoValues, formDataToObject, type FormState } from "@/lib/forms";
import { DEFAULT_BODY_LIMIT, readCapped, readJsonCapped } from "@/lib/input/body";
import { localPath } from "@/lib/input/local-path";
import { pathParam, pathParams } from "@/lib/input/path-params";
import { comesFromHere, CROSS_ORIGIN_REFUSED } from "./origin";
import { getDb, registerBusy } from "@/db";
import { clientAddressOf, PEER_HEADER, trustedProxyHops } from "./client-address";
import { AppError, forbiddenError, unauthenticated } from "./errors";
import { SESSION_COOKIE } from "./lucia";
import { MACHINE_SCOPE_PERMISSIONS, verifyMachineToken, type MachineScope, type Principal } from "./machine-tokens";
import type { Permission } from "./permissions";
import { checkSession, startSession, type AuthUser } from "./sessions";

export { recorderFor, type MachinePrincipal, type MachineScope, type Principal } from "./machine-tokens";

/** The signed-in user of this request (read once per request), or null. */
export const currentUser = cache(async (): Promise<AuthUser | null> => {
  const store = await cookies();
  const check = await checkSession(store.get(SESSION_COOKIE)?.value);
  if (check.cookie) {
    try {
      store.set(check.cookie.name, check.cookie.value, check.cookie.attributes);
    } catch {
      // Rendering a server component cannot set cookies; the next action or route will.
    }
  }
  return check.user;
});

/** For pages: the signed-out go to sign-in; a role without the permission gets the 403 page. */
export async function requirePage(permission: Permission): Promise<AuthUser> {
  const user = await currentUser();
  if (!user) redirect("/sign-in");
  if (!user.permissions.has(permission)) forbidden();
  return user;
}

/**
 * A page's path parameter as Next.js decoded it (never decoded again: "%25" stays "%"), or the
 * not-found page when no serial, code or id could be it (lib/input/path-params.ts).
 */
export function pageParam(value: unknown): string {
  const v = pathParam(value);
  if (v === null) notFound();
  return v;
}

export interface ActionResult extends FormState {
  /** Paths to revalidate, then a path to go to, both done after the body, outside any try. */
  revalidate?: string[];
  redirectTo?: string;
}

type Guarded<F> = F & { permission: Permission | null };

const FAILED = "Something went wrong and nothing was saved. Try again; if it keeps happening, tell an administrator.";

const REDIRECT_REFUSED = "This was saved, but the page to go to next is not valid. Reload the page to see what was recorded, and tell an administrator.";

function failure(e: unknown): FormState {
  if (e instanceof AppError) return { ok: false, status: e.status, message: e.message, fieldErrors: e.fieldErrors };
  // Other processes' writes held the register past the wait (often inside Drizzle's own error).
  const busy = registerBusy(e);
  if (busy) return { ok: false, status: busy.status, message: busy.message };
  console.error(e);
  return { ok: false, status: 500, message: FAILED };
}

function makeAction<S extends z.ZodType>(
  permission: Permission | null,
  schema: S,
  body: (input: z.output<S>, user: AuthUser | null) => Promise<ActionResult | void>,
): Guarded<(prev: FormState | undefined, formData: FormData) => Promise<FormState>> {
  // Only fields the schema declares (and none marked secret) are ever sent back.
  const plan = echoPlan(schema);
  const action = async (_prev: FormState | undefined, formData: FormData): Promise<FormState> => {
    const raw = formDataToObject(formData);
    let user: AuthUser | null = null;
    if (permission) {
      user = await currentUser();
      if (!user) return { ...failure(unauthenticated()), values: echoValues(raw, plan) };
      if (!user.permissions.has(permission)) return { ...failure(forbiddenError()), values: echoValues(raw, plan) };
    }
    const parsed = schema.safeParse(raw);
    if (!parsed.success) {
      return {
        ok: false,
        status: 400,
        message: "Some fields need attention.",
        fieldErrors: z.flattenError(parsed.error).fieldErrors as Record<string, string[]>,
        values: echoValues(raw, plan),
      };
    }
    let result: ActionResult;
    try {
      result = (await body(parsed.data, user)) ?? { ok: true };
    } catch (e) {
      return { ...failure(e), values: echoValues(raw, plan) };
    }
    let to: string | null = null;
    if (result.redirectTo) {
      // Every redirect passes the one gate; one it refuses is a programming slip, not the user's.
      to = localPath(result.redirectTo);
      if (to === null) {
        console.error(`guardedAction: refused to redirect to ${JSON.stringify(result.redirectTo.slice(0, 200))}`);
        return { ok: false, status: 500, message: REDIRECT_REFUSED };
      }
    }
    for (const path of result.revalidate ?? []) revalidatePath(path);
    if (to) redirect(to);
    const { revalidate: _r, redirectTo: _d, ...state } = result;
    return state;
  };
  return Object.assign(action, { permission });
}

/** A server action behind the session, a named permission and a zod schema. */
export function guardedAction<S extends z.ZodType>(
  permission: Permission,
  schema: S,
  body: (input: z.output<S>, user: AuthUser) => Promise<ActionResult | void>,
) {
  return makeAction(permission, schema, (input, user) => body(input, user!));
}

/** A server action that needs no session (sign-in, reset, invite acceptance). Still validated. */
export function publicAction<S extends z.ZodType>(schema: S, body: (input: z.output<S>) => Promise<ActionResult | void>) {
  return makeAction(null, schema, (input) => body(input));
}

type RouteContext = { params: Promise<Record<string, string | string[]>> };

function json(status: number, body: unknown, init?: ResponseInit) {
  return Response.json(body, { ...init, status });
}

export const NOT_AN_ADDRESS = "Nothing is found at this address.";
export const MACHINE_ROUTE_ONLY = "Machine tokens may only reach the lab's endpoints.";
export const MACHINE_TOKEN_INVALID = "This machine token is not valid (unknown or revoked).";

type RouteArgs<Q extends z.ZodType, B extends z.ZodType> = {
  req: Request;
  query: z.output<Q>;
  body: z.output<B>;
  params: Record<string, string | string[]>;
};

/**
 * Who called: on an ordinary route always a signed-in `user` (with `machine: null`); on a route
 * that declared `machine`, exactly one of `user` and `machine` is set. Check `machine` first:
 * `if (machine) … else user.id` narrows both.
 */
type CallerOf<M extends MachineScope | undefined> = M extends MachineScope ? Principal : { user: AuthUser; machine: null };

export type GuardedRoute = Guarded<(req: Request, ctx: RouteContext) => Promise<Response>> & {
  /** The machine scope the route lets in with a Bearer token, or null: sessions only. */
  machine: MachineScope | null;
};

/**
 * A route handler behind the session, a named permission and zod schemas for the query string
 * and the JSON body. Answers 401, 403 or 400 in JSON before the handler runs. A request that
 * changes state (any method but GET, HEAD and OPTIONS) must first come from this origin
 * (`refuseCrossOrigin`), or carry a machine token.
 *
 * A route under app/api/v1/lab/ may also let test benches in with `machine: "lab"`: a request
 * with `Authorization: Bearer tlm_…` then runs the handler with `machine` set and `user` null,
 * if the token is known, not revoked and of that scope (else 401). A Bearer token on any other
 * route is refused with 403 whatever it is; a request with a Bearer header is judged by the
 * token alone, never by a session cookie it may also carry. Sessions work as before, and must
 * hold the permission. Records a machine makes follow `recorderFor` (lib/auth/machine-tokens):
 * actorId null, station "lab-bench", and { machineTokenId, machineTokenName } in the event data.
 */
export function guardedRoute<
  Q extends z.ZodType = z.ZodType<Record<string, never>>,
  B extends z.ZodType = z.ZodType<undefined>,
  M extends MachineScope | undefined = undefined,
>(
  permission: Permission,
  opts: { query?: Q; body?: B; machine?: M; bodyLimit?: number },
  handler: (args: RouteArgs<Q, B> & CallerOf<M>) => Promise<unknown>,
): GuardedRoute {
  const machine: MachineScope | null = opts.machine ?? null;
  if (machine && !MACHINE_SCOPE_PERMISSIONS[machine]?.includes(permission)) {
    // A programming slip, caught when the route file loads rather than by a bench in production.
    throw new Error(`guardedRoute: a "${machine}" machine token cannot be let in to a route guarded by "${permission}".`);
  }
  const route = async (req: Request, ctx: RouteContext): Promise<Response> => {
    const crossSite = refuseCrossOrigin(req);
    if (crossSite) return crossSite;
    let caller: Principal;
    const bearer = /^Bearer(?:\s+(.*))?$/i.exec(req.headers.get("authorization")?.trim() ?? "");
    if (bearer) {
      if (!machine) return json(403, { error: MACHINE_ROUTE_ONLY });
      const principal = await verifyMachineToken(getDb(), bearer[1] ?? "");
      if (!principal) return json(401, { error: MACHINE_TOKEN_INVALID }, { headers: { "WWW-Authenticate": 'Bearer error="invalid_token"' } });
      if (principal.scope !== machine) return json(403, { error: MACHINE_ROUTE_ONLY });
      caller = { user: null, machine: principal };
    } else {
      const user = await currentUser();
      if (!user) return json(401, { error: unauthenticated().message });
      if (!user.permissions.has(permission)) return json(403, { error: forbiddenError().message });
      caller = { user, machine: null };
    }
    const url = new URL(req.url);
    const query = (opts.query ?? z.object({})).safeParse(Object.fromEntries(url.searchParams));
    if (!query.success) return json(400, { error: "The query is not valid.", fieldErrors: z.flattenError(query.error as z.ZodError).fieldErrors });
    // A value Next decoded from the path that no serial, code or id could be is not found, not a crash.
    const params = pathParams((await ctx.params) ?? {});
    if (!params) return json(404, { error: NOT_AN_ADDRESS });
    let bodyValue: unknown = undefined;
    if (opts.body) {
      try {
        bodyValue = await readJsonCapped(req, opts.bodyLimit ?? DEFAULT_BODY_LIMIT);
      } catch (e) {
        const f = failure(e);
        return json(f.status ?? 400, { error: f.message });
      }
      const parsed = opts.body.safeParse(bodyValue);
      if (!parsed.success) return json(400, { error: "The body is not valid.", fieldErrors: z.flattenError(parsed.error).fieldErrors });
      bodyValue = parsed.data;
    }
    try {
      const args = { req, ...caller, query: query.data as z.output<Q>, body: bodyValue as z.output<B>, params };
      // A session caller satisfies both shapes of CallerOf; a machine one only reaches routes that declared it.
      const out = await handler(args as RouteArgs<Q, B> & CallerOf<M>);
      return out instanceof Response ? out : json(200, out);
    } catch (e) {
      const f = failure(e);
      return json(f.status ?? 500, { error: f.message, fieldErrors: f.fieldErrors });
    }
  };
  return Object.assign(route, { permission, machine });
}

/** A route let in by a signature on its body instead of a session (see `signedRoute`). */
export type SignedRoute = GuardedRoute & {
  /** Who signs: the route checks that sender's signature on the raw body before anything else. */
  signedBy: string;
};

/**
 * A route handler for another system's signed calls (the payment provider's webhook): no session,
 * no permission, no same-origin rule, because the caller is a server of another origin. Instead
 * the raw body, read within `bodyLimit`, must pass `verify` (the sender's signature over those exact
 * bytes, checked with its own SDK), which returns what the body says or throws an AppError (400);
 * the handler sees only what `verify` returned. A session cookie or Bearer token the request also
 * carries counts for nothing. Errors are JSON like guardedRoute's, never a stack trace.
 */
export function signedRoute<T>(
  signedBy: string,
  opts: { bodyLimit?: number; verify: (raw: string, req: Request) => T },
  handler: (args: { req: Request; verified: T }) => Promise<unknown>,
): SignedRoute {
  const route = async (req: Request): Promise<Response> => {
    let verified: T;
    try {
      const raw = new TextDecoder("utf-8", { fatal: true }).decode(await readCapped(req, opts.bodyLimit ?? DEFAULT_BODY_LIMIT));
      verified = opts.verify(raw, req);
    } catch (e) {
      const f = e instanceof TypeError ? { status: 400, message: "The body is not UTF-8 text." } : failure(e);
      return json(f.status === 500 ? 400 : (f.status ?? 400), { error: f.message });
    }
    try {
      const out = await handler({ req, verified });
      return out instanceof Response ? out : json(200, out);
    } catch (e) {
      const f = failure(e);
      return json(f.status ?? 500, { error: f.message });
    }
  };
  return Object.assign(route, { permission: null, machine: null, signedBy });
}

/**
 * A GET for people with no account (the page an owner lands on after the payment service): no
 * session, no permission, nothing written; the query still passes its zod schema.
 */
export function publicGetRoute<Q extends z.ZodType>(query: Q, handler: (args: { req: Request; query: z.output<Q> }) => Promise<Response>): GuardedRoute {
  const route = async (req: Request): Promise<Response> => {
    const q = query.safeParse(Object.fromEntries(new URL(req.url).searchParams));
    if (!q.success) return json(400, { error: "The query is not valid." });
    try {
      return await handler({ req, query: q.data });
    } catch (e) {
      const f = failure(e);
      return json(f.status ?? 500, { error: f.message });
    }
  };
  return Object.assign(route, { permission: null, machine: null });
}

export { CROSS_ORIGIN_REFUSED };

/**
 * Cross-site request forgery: a state-changing request must come from this origin or carry a
 * machine token (lib/auth/origin.ts, `comesFromHere`). Returns the 403 answer, or null when the
 * request may go on.
 */
export function refuseCrossOrigin(req: Request): Response | null {
  return comesFromHere(req) ? null : json(403, { error: CROSS_ORIGIN_REFUSED });
}

/**
 * The same rule for a server action, read from its request headers: proxy.ts already refuses an
 * action from another origin, and Next checks too, but a public action that writes says so itself.
 */
export async function actionComesFromHere(): Promise<boolean> {
  const h = await headers();
  const host = h.get("x-forwarded-host") ?? h.get("host") ?? "localhost";
  return comesFromHere(new Request(`http://${host}/`, { method: "POST", headers: new Headers(h) }));
}

/**
 * The client's address for limits: the connection's own (stamped by instrumentation.ts, never the
 * client's word), or with TWINLEAF_TRUSTED_PROXY_HOPS set, the X-Forwarded-For entry that many
 * proxies back.
 */
export async function clientAddress(): Promise<string> {
  const h = await headers();
  return clientAddressOf({ peer: h.get(PEER_HEADER), forwardedFor: h.get("x-forwarded-for"), hops: trustedProxyHops() });
}

/** The address links in e-mails point at: APP_URL, or the host this request came to. */
export async function appBaseUrl(): Promise<string> {
  if (process.env.APP_URL) return process.env.APP_URL.replace(/\/$/, "");
  const h = await headers();
  const host = h.get("x-forwarded-host") ?? h.get("host") ?? "localhost:3000";
  const proto = h.get("x-forwarded-proto") ?? "http";
  return `${proto}://${host}`;
}

/** Sets or clears the session cookie (actions and route handlers only). */
export async function setSessionCookie(cookie: Cookie) {
  (await cookies()).set(cookie.name, cookie.value, cookie.attributes);
}

/** Opens a session for a user who has just proved who they are, and sets its cookie. */
export async function signInAs(userId: string) {
  const { cookie } = await startSession(userId);
  await setSessionCookie(cookie);
}
