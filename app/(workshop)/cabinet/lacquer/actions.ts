"use server";
import { getDb } from "@/db";
import { guardedAction } from "@/lib/auth/guard";
import { makeLacquerCabinets } from "@/lib/cabinets/lacquer";
import { paths } from "@/lib/paths";
import { makeLacquerSchema } from "./schemas";

export const makeLacquerAction = guardedAction("cabinet.lacquer", makeLacquerSchema, async (input, user) => {
  const station = user.roles.includes("cabinet") ? "cabinet" : "veneer";
  const made = await makeLacquerCabinets(getDb(), input, { id: user.id }, station);
  return {
    ok: true,
    revalidate: [paths.lacquer],
    redirectTo: `${paths.lacquer}?made=${encodeURIComponent(made.map((c) => c.identity).join(","))}`,
  };
});
