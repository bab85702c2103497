"use server";
import { z } from "zod";
import { getDb } from "@/db";
import { guardedAction } from "@/lib/auth/guard";
import { createMachineToken, displayPrefix, revokeMachineToken } from "@/lib/auth/machine-tokens";

const createTokenSchema = z.object({
  name: z.string().trim().min(2, "Name the token after the bench it is for, e.g. Lab bench 2.").max(80, "Keep the name under 80 characters."),
  // Only the lab takes machine tokens today; the field is fixed in the form.
  scope: z.literal("lab", { error: "Machine tokens can only be made for the lab." }).default("lab"),
});

const revokeTokenSchema = z.object({
  tokenId: z.string().min(1, "Choose a token to revoke."),
  reason: z.string().trim().max(500, "Keep the reason under 500 characters.").optional(),
});

/** Makes a token and hands it back once, in the form state only: it is stored as a hash. */
export const createTokenAction = guardedAction("admin.tokens", createTokenSchema, async (input, user) => {
  const { token, row } = await createMachineToken(getDb(), { name: input.name, scope: input.scope, actorId: user.id });
  return {
    ok: true,
    message: `Token made for ${row.name}.`,
    data: { token, name: row.name, prefix: displayPrefix(row.prefix) },
    revalidate: ["/admin/tokens"],
  };
});

export const revokeTokenAction = guardedAction("admin.tokens", revokeTokenSchema, async (input, user) => {
  const { name } = await revokeMachineToken(getDb(), { id: input.tokenId, actorId: user.id, reason: input.reason });
  return { ok: true, message: `Revoked ${name}. A bench using it is refused from its next request.`, revalidate: ["/admin/tokens"] };
});
