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

/** Only a path inside Twinleaf may follow sign-in. */
export function safeNext(next: string | undefined): string {
  return next && next.startsWith("/") && !next.startsWith("//") && !next.startsWith("/\\") ? next : "/";
}
