/**
 * The lab's forms through their guarded server actions, as a browser sends them: a batch whose
 * number of units disagrees with the serials scanned, and a Thiele–Small CSV with problems in many
 * rows. Each refusal names every problem and writes nothing. Invented serials and values.
 */
import { eq, sql } from "drizzle-orm";
import { beforeAll, describe, expect, test, vi } from "vitest";
import { getDb } from "@/db";
import { events, items, tsParams, unitBatches, users } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { startSession } from "@/lib/auth/sessions";
import type { FormState } from "@/lib/forms";
import { batchUnitsView, registerBatch } from "@/lib/lab/units";

// The session the mocked request carries, and redirect() as a throw (see guard-walk.test.ts).
const request = vi.hoisted(() => {
  class RedirectSignal extends Error {
    constructor(public readonly to: string) {
      super(`redirect to ${to}`);
    }
  }
  return { sessionId: null as string | null, RedirectSignal };
});

vi.mock("next/headers", async () => {
  const { SESSION_COOKIE } = await import("@/lib/auth/lucia-cookie");
  return {
    cookies: async () => ({
      get: (name: string) => (name === SESSION_COOKIE && request.sessionId ? { name, value: request.sessionId } : undefined),
      set: () => {},
    }),
    headers: async () => new Headers({ host: "localhost:3000" }),
  };
});
vi.mock("next/cache", () => ({ revalidatePath: () => {}, revalidateTag: () => {} }));
vi.mock("next/navigation", () => ({
  redirect: (to: string) => {
    throw new request.RedirectSignal(to);
  },
  forbidden: () => {
    throw new Error("forbidden");
  },
  notFound: () => {
    throw new Error("notFound() called");
  },
}));

const { registerBatchAction, tsCsvAction } = await import("@/app/(workshop)/lab/actions/batches");

const db = () => getDb();
let labId = "";

beforeAll(async () => {
  await seedDemo(db(), { history: false });
  labId = (await db().select().from(users).where(eq(users.email, "lab@demo.twinleaf.test")))[0]!.id;
  request.sessionId = (await startSession(labId, db())).session.id;
});

async function send(action: (prev: FormState | undefined, fd: FormData) => Promise<FormState>, fields: Record<string, string>) {
  const fd = new FormData();
  for (const [k, v] of Object.entries(fields)) fd.set(k, v);
  try {
    return { state: await action(undefined, fd) };
  } catch (e) {
    if (e instanceof request.RedirectSignal) return { redirectedTo: e.to };
    throw e;
  }
}

const count = async (table: typeof items | typeof events | typeof unitBatches | typeof tsParams) => Number((await db().select({ n: sql<number>`count(*)` }).from(table))[0]!.n);
const written = async () => ({ items: await count(items), events: await count(events), batches: await count(unitBatches), ts: await count(tsParams) });

const batchForm = { partType: "bass", partNumber: "B-ACT", maker: "An invented maker", lot: "L-ACT", receivedOn: "2026-11-30" };

describe("registering a batch", () => {
  test("five units typed with six serials scanned is refused beside the number, the typed values kept, nothing written", async () => {
    const before = await written();
    const { state } = await send(registerBatchAction, { ...batchForm, count: "5", makerSerials: "B1\nB2\nB3\nB4\nB5\nB6" });
    expect(state?.ok).toBe(false);
    expect(state?.fieldErrors?.count).toEqual(["The number of units is 5, but 6 makers' serials are scanned. Leave the number empty to register one unit per serial, or check the list."]);
    expect(state?.values).toMatchObject({ count: "5", makerSerials: "B1\nB2\nB3\nB4\nB5\nB6" });
    expect(await written()).toEqual(before);
  });

  test("with the number left empty the batch holds one unit per serial", async () => {
    const { redirectedTo } = await send(registerBatchAction, { ...batchForm, count: "", makerSerials: "B1\nB2\nB3\nB4\nB5\nB6" });
    expect(redirectedTo).toMatch(/^\/lab\/batches\/BS-2611-\d{2}\?registered=1$/);
    const code = decodeURIComponent(/batches\/([^?]+)/.exec(redirectedTo!)![1]!);
    const [batch] = await db().select().from(unitBatches).where(eq(unitBatches.code, code));
    expect((await batchUnitsView(db(), batch!.id)).map((u) => u.makerSerial).sort()).toEqual(["B1", "B2", "B3", "B4", "B5", "B6"]);
  });
});

describe("a Thiele–Small CSV", () => {
  test("every problem of every row comes back in one answer, and nothing is saved until all are put right", async () => {
    const batch = await registerBatch(db(), { partType: "bass", partNumber: "B-CSV", maker: "An invented maker", lot: "L-CSV", receivedOn: "2026-11-30", makerSerials: ["C1", "C2", "C3"], count: 0 }, { id: labId });
    const before = await written();
    const bad = ["serial,fs,qes,qms,re", "C1,abc,0.4,3,6", "C2,2,0.4,3,200", "NOPE,35,0.4,3,6"].join("\n");
    const { state } = await send(tsCsvAction, { batch: batch.code, csv: bad });
    expect(state?.ok).toBe(false);
    expect(state?.message).toBe("Nothing was saved: 4 problems in 3 rows. Correct them all and bring the file in again.");
    expect(state?.fieldErrors?.csv).toEqual([
      'Line 2: Fs "abc" is not a number.',
      "Line 3 (C2): Fs (Hz) must be between 5 and 40000 Hz; 2 looks mistyped.",
      "Line 3 (C2): Re (Ω) must be between 0.5 and 100 Ω; 200 looks mistyped.",
      "Line 4: NOPE is not a unit of this batch.",
    ]);
    expect(await written()).toEqual(before);

    // All four put right at once: the next try saves all three rows.
    const good = ["serial,fs,qes,qms,re", "C1,36,0.4,3,6", "C2,35.5,0.4,3,6.1", "C3,35,0.4,3,6"].join("\n");
    const saved = await send(tsCsvAction, { batch: batch.code, csv: good });
    expect(saved.state).toMatchObject({ ok: true, message: "Thiele–Small parameters saved for 3 units." });
    expect((await written()).ts).toBe(before.ts + 3);
  });
});
