import { z } from "zod";
import { getDb } from "@/db";
import { guardedRoute } from "@/lib/auth/guard";
import { openCase } from "@/lib/service/intake";
import { caseSummaryJson, warrantyJson } from "@/lib/service/json";
import { caseParticulars, listCases } from "@/lib/service/queries";
import { CASE_STATES } from "@/lib/vocabulary/case-states";
import { caseIntakeBody } from "@/lib/service/intake-schema";

const query = z.object({
  state: z.enum(CASE_STATES, { error: `state is one of ${CASE_STATES.join(", ")}.` }).optional(),
});

/** Cases, oldest received first: the open ones, or those in one state. */
export const GET = guardedRoute("register.read", { query }, async ({ query }) => {
  const db = getDb();
  const rows = await listCases(db, { state: query.state });
  return {
    cases: rows.map((r) => ({ code: r.code, state: r.state, receivedOn: r.receivedOn, returnedBy: r.returnedBy, serial: r.item, kind: r.itemKind, pair: r.pair, model: r.model, dealer: r.dealer })),
  };
});

/** Opens a case for a returned speaker or pair; refusals are 4xx with the field named. */
export const POST = guardedRoute("service.work", { body: caseIntakeBody }, async ({ body, user }) => {
  const db = getDb();
  const opened = await openCase(db, body, user);
  const p = await caseParticulars(db, opened.case);
  const summary = caseSummaryJson(p);
  return Response.json(
    { code: summary.code, state: summary.state, speaker: summary.speaker, pair: summary.pair, partner: summary.partner, dealer: summary.dealer, warranty: warrantyJson(opened.warranty) },
    { status: 201 },
  );
});
