/**
 * The Next.js request an integration test pretends to be in. `tests/integration/setup.ts` mocks
 * `next/headers`, `next/navigation` and `next/cache` with the modules below for every integration
 * file, so a test only sets `request.sessionId` (sign in) and reads `request.cookieSets`.
 * The setup file and the test share this module instance: vitest runs both in the file's context.
 */
import { ResponseCookies } from "next/dist/server/web/spec-extension/cookies";
import { SESSION_COOKIE } from "@/lib/auth/lucia-cookie";

/** redirect() in a test: thrown like Next's own, so the code after it never runs. */
export class RedirectSignal extends Error {
  constructor(public readonly to: string) {
    super(`redirect to ${to}`);
  }
}

export class ForbiddenSignal extends Error {
  constructor() {
    super("forbidden");
  }
}

export class NotFoundSignal extends Error {
  constructor() {
    super("notFound() called");
  }
}

/** What the mocked request carries; each test file starts with a fresh one (its own module context). */
export const request = {
  /** The session id the `twinleaf_session` cookie holds; null is signed out. */
  sessionId: null as string | null,
  /** Every cookie the code under test set, in order. */
  cookieSets: [] as { name: string; value: string }[],
  /** Further request headers, e.g. the connection's address stamp or X-Forwarded-For. */
  headers: {} as Record<string, string>,
  /** The Set-Cookie header lines those sets make, written by Next's own cookie serializer. */
  setCookieHeaders: [] as string[],
};

type CookieOptions = Parameters<ResponseCookies["set"]>[2];

export const nextHeaders = {
  cookies: async () => ({
    get: (name: string) => (name === SESSION_COOKIE && request.sessionId ? { name, value: request.sessionId } : undefined),
    set: (nameOrCookie: string | { name: string; value: string }, value?: string, options?: CookieOptions) => {
      const c = typeof nameOrCookie === "string" ? { name: nameOrCookie, value: value ?? "" } : nameOrCookie;
      request.cookieSets.push({ name: c.name, value: c.value });
      const headers = new Headers();
      new ResponseCookies(headers).set(c.name, c.value, options);
      request.setCookieHeaders.push(...headers.getSetCookie());
    },
  }),
  headers: async () => new Headers({ host: "localhost:3000", ...request.headers }),
};

export const nextNavigation = {
  redirect: (to: string): never => {
    throw new RedirectSignal(to);
  },
  forbidden: (): never => {
    throw new ForbiddenSignal();
  },
  notFound: (): never => {
    throw new NotFoundSignal();
  },
};

// Revalidation has no cache to clear outside a Next server.
export const nextCache = { revalidatePath: () => {}, revalidateTag: () => {} };
