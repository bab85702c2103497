import { z } from "zod";
import { MIN_PASSWORD_LENGTH } from "@/lib/auth/password-rules";
import { secret } from "@/lib/forms";
import { emailAddress } from "@/lib/input/email";
import { localPath } from "@/lib/input/local-path";

export const emailField = emailAddress("Enter your e-mail address.");

export const signInSchema = z.object({
  email: emailField,
  password: secret(z.string().min(1, "Enter your password.")),
  next: z.string().optional(),
});

export const resetRequestSchema = z.object({ email: emailField });

/** Setting a password, from an invite or a reset link. */
export const newPasswordSchema = z
  .object({
    token: secret(z.string().min(10, "This link is not complete.")),
    password: secret(z.string().min(MIN_PASSWORD_LENGTH, `Use at least ${MIN_PASSWORD_LENGTH} characters.`).max(200, "Use at most 200 characters.")),
    confirm: secret(z.string()),
  })
  .refine((v) => v.password === v.confirm, { path: ["confirm"], message: "The two passwords differ." });

/** The page after sign-in: a path on Twinleaf's own origin (lib/input/local-path.ts), else home. */
export function safeNext(next: string | undefined): string {
  return localPath(next) ?? "/";
}
