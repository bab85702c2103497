"use server";
import { cookies } from "next/headers";
import { z } from "zod";
import { publicAction, setSessionCookie } from "@/lib/auth/guard";
import { SESSION_COOKIE } from "@/lib/auth/lucia";
import { endSession } from "@/lib/auth/sessions";

/** Ends this browser's session. Needs no permission: anyone may leave. */
export const signOutAction = publicAction(z.object({}), async () => {
  const id = (await cookies()).get(SESSION_COOKIE)?.value;
  if (id) await setSessionCookie(await endSession(id));
  return { ok: true, redirectTo: "/sign-in" };
});
