"use server";
import { getDb } from "@/db";
import { guardedAction } from "@/lib/auth/guard";
import { paths } from "@/lib/paths";
import { sendCaseBack } from "@/lib/service/return";
import { returnSchema } from "./schemas";

export const sendBackAction = guardedAction("service.work", returnSchema, async (input, user) => {
  const r = await sendCaseBack(getDb(), input, { id: user.id });
  return {
    ok: true,
    message: `Packed in carton ${r.carton.identity} and shipped as ${r.shipment.identity}. The case is sent back.`,
    revalidate: [paths.serviceReturn(r.code), paths.serviceCase(r.code), "/service"],
    redirectTo: paths.serviceCase(r.code),
  };
});
