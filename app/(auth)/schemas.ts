import { z } from "zod";
import { MIN_PASSWORD_LENGTH } from "@/lib/auth/password-rules";

export const emailField = z.string().trim().min(1, "Enter your e-mail address.").pipe(z.email("Enter a whole e-mail address, like name@example.test."));

export const signInSchema = z.object({
  email: emailField,
  password: z.string().min(1, "Enter your password."),
  next: z.string().optional(),
});

export const resetRequestSchema = z.object({ email: emailField });

/** Setting a password, from an invite or a reset link. */
export const newPasswordSchema = z
  .object({
    token: z.string().min(10, "This link is not complete."),
    password: z.string().min(MIN_PASSWORD_LENGTH, `Use at least ${MIN_PASSWORD_LENGTH} characters.`).max(200, "Use at most 200 characters."),
    confirm: z.string(),
  })
  .refine((v) => v.password === v.confirm, { path: ["confirm"], message: "The two passwords differ." });

/**
 * Only a path inside Twinleaf may follow sign-in. Browsers drop tabs and newlines and read "\\" as
 * "/" when parsing a URL, so a path holding any of them is refused outright.
 */
export function safeNext(next: string | undefined): string {
  if (!next || !next.startsWith("/") || /[\u0000-\u001f\u007f\\]/.test(next)) return "/";
  const base = "http://twinleaf.invalid";
  const parsed = new URL(next, base);
  return parsed.origin === base && !next.startsWith("//") ? `${parsed.pathname}${parsed.search}${parsed.hash}` : "/";
}
