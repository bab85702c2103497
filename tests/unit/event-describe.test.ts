/**
 * The event log in words: every event type reads as a sentence with units, and no position code,
 * state code or internal id shows bare. The expected sentences are the register's own wording
 * (lib/events/describe.ts); the serials are formed by lib/serials and their check characters fit.
 */
import { describe, expect, test } from "vitest";
import { describeEvent, placeWords, positionWords, subjectLabel, subjectWords } from "@/lib/events/describe";
import { EVENT_TYPES } from "@/lib/vocabulary/event-types";

const PAIR = "P-PW2-26-00042-W";
const CARTON = "K-PW2-26-00041-P";
const SHIPMENT = "H-MLR-26-00007-4";
const SPEAKER = "S-PW2-26-00083-C";
const CABINET = "C-PW2-26-00011-U";
const UNIT = "D-TW-26-00501-4";

describe("describeEvent", () => {
  test.each([
    ["pair.shipped", { identity: PAIR, carton: CARTON, shipment: SHIPMENT, dealer: "MLR" }, { dealerNames: { MLR: "Merrow Lane Audio" } },
      `shipped the pair in carton ${CARTON} to Merrow Lane Audio in shipment ${SHIPMENT}`],
    ["pair.shipped", { identity: PAIR, carton: CARTON, shipment: SHIPMENT, dealer: "MLR" }, {},
      `shipped the pair in carton ${CARTON} to dealer MLR in shipment ${SHIPMENT}`],
    // A past year, so the date keeps its year whatever today is (lib/format.ts omits the current year).
    ["shipment.dispatched", { identity: SHIPMENT, dealer: "MLR", shippedOn: "2024-03-05", carrier: "Fernway Freight", tracking: "FW123", cartons: [CARTON, "K-PW2-26-00042-?"] }, { dealerNames: { MLR: "Merrow Lane Audio" } },
      `dispatched shipment ${SHIPMENT} to Merrow Lane Audio: 2 cartons, with Fernway Freight, tracking FW123, left on 5 Mar 2024`],
    ["pair.packed", { identity: PAIR, carton: CARTON, location: "Rack B, shelf 2" }, {}, `packed the pair into carton ${CARTON}, stored at Rack B, shelf 2`],
    ["carton.moved", { identity: CARTON, location: "Bay 3", from: "Rack B" }, {}, "moved the carton from Rack B to Bay 3"],
    ["carton.stored", { identity: CARTON, location: "Rack B" }, {}, "stored the carton at Rack B"],
    ["link.fitted", { parent: CARTON, child: PAIR, position: "PAIR" }, {}, `packed it into carton ${CARTON}`],
    ["link.fitted", { parent: SHIPMENT, child: CARTON, position: "2" }, {}, `loaded it into shipment ${SHIPMENT}, as its carton 2`],
    ["link.fitted", { parent: SPEAKER, child: UNIT, position: "T" }, {}, `fitted it into speaker ${SPEAKER}, as its tweeter (T)`],
    ["link.fitted", { parent: SPEAKER, child: UNIT, position: "B2", replaces: "D-BS-26-00002-X" }, {}, `fitted it into speaker ${SPEAKER}, as its bass 2 (B2), replacing D-BS-26-00002-X`],
    ["link.fitted", { parent: PAIR, child: CABINET, position: "CAB-L" }, {}, `fitted it into pair ${PAIR}, as its left cabinet`],
    ["link.fitted", { parent: PAIR, child: SPEAKER, position: "R" }, {}, `fitted it into pair ${PAIR}, as its right speaker`],
    ["link.fitted", { parent: CABINET, child: "F-WAL-26-00012-Z/03", position: "F2" }, {}, `fitted it into cabinet ${CABINET}, as its face leaf 2`],
    ["link.removed", { parent: SPEAKER, child: UNIT, position: "T" }, {}, `took it out of speaker ${SPEAKER}, as its tweeter (T)`],
    ["item.state_changed", { identity: SPEAKER, from: "built", to: "shipped", shipment: SHIPMENT }, {}, `changed its state from built to shipped, in shipment ${SHIPMENT}`],
    ["item.state_changed", { identity: PAIR, from: "ready_to_pack", to: "packed", carton: CARTON }, {}, `changed its state from ready to pack to packed, in carton ${CARTON}`],
    ["item.created", { identity: CARTON, kind: "carton", state: "packed" }, {}, "registered the carton"],
    // Fs to three significant figures below 100 Hz, as the lab writes it (lib/acoustics/format.ts): 37.51 → 37.5 Hz.
    ["unit.ts_measured", { identity: UNIT, fsHz: 37.51, qts: 0.3783, reOhm: 6, vasL: 30.1, sensitivityDb: 87.5 }, {}, "measured Thiele–Small parameters: Fs 37.5 Hz, Qts 0.378, Re 6 Ω, Vas 30.1 L, sensitivity 87.5 dB"],
    ["unit.response_measured", { identity: UNIT, points: 200, fromHz: 20, toHz: 20000 }, {}, "measured a response of 200 points from 20 Hz to 20 kHz"],
    ["pair.final_tested", { pass: true, maxDiffDb: 0.42, worstBand: "2.5k", limitDb: 1 }, {}, "passed the final pair test: largest difference 0.42 dB at 2.5 kHz, limit 1 dB"],
    ["pair.final_tested", { pass: false, maxDiffDb: 1.3, worstBand: "800", limitDb: 1 }, {}, "failed the final pair test: largest difference 1.3 dB at 800 Hz, limit 1 dB"],
    ["set.matched", { code: "TW-2612-01", left: UNIT, right: "D-TW-26-00502-2", maxDiffDb: 0.21, limitDb: 0.5 }, {}, `matched ${UNIT} with D-TW-26-00502-2: 0.21 dB apart at most, limit 0.5 dB`],
    ["route.step_recorded", { seq: 3, step: "Trim check", side: "L", outOfWindow: ["trimDeviation"] }, {}, "recorded step 3, trim check, for the left cabinet (1 reading out of window)"],
    ["nc.dispositioned", { code: "NC-2603-001", disposition: "use_as_is" }, {}, "decided nonconformance NC-2603-001: use as is (deviation approved)"],
    ["user.roles_changed", { email: "a@b.test", from: ["lab"], to: ["lab", "quality"] }, {}, "changed the roles from Lab to Lab and Quality"],
    ["certificate.printed", { copy: true }, {}, "printed a copy of the certificate"],
  ] as const)("%s %j", (type, data, ctx, sentence) => {
    expect(describeEvent(type, data as Record<string, unknown>, ctx)).toBe(sentence);
  });

  // Every type a user can meet: a sentence, with no event code, underscore or bare position code.
  test.each(EVENT_TYPES.map((t) => [t]))("%s reads as words even with no data", (type) => {
    const sentence = describeEvent(type, {});
    expect(sentence).toMatch(/^[a-z]/);
    expect(sentence).not.toContain(type);
    expect(sentence).not.toMatch(/_|\bundefined\b|\bnull\b|\bNaN\b|\[object/);
    expect(sentence).not.toMatch(/ {2}| ,|from to\b/);
  });

  test("a type recorded before the vocabulary existed still reads as words", () => {
    expect(describeEvent("bench.calibrated", { value: 1 })).toBe("recorded bench calibrated");
  });
});

describe("placeWords", () => {
  test.each([
    [CARTON, "PAIR", `carton ${CARTON}`],
    [SPEAKER, "XO", `speaker ${SPEAKER}, as its crossover`],
    [SPEAKER, "CAB", `speaker ${SPEAKER}, as its cabinet`],
    ["X-PW2-26-00003-G", "C4", "crossover board X-PW2-26-00003-G, at position C4"],
    ["not-a-serial", "", "not-a-serial"],
  ])("%s at %s → %s", (parent, position, words) => {
    expect(placeWords(parent, position)).toBe(words);
  });
});

describe("positionWords", () => {
  test.each([
    ["speaker", "T", "tweeter (T)"],
    ["speaker", "B2", "bass 2 (B2)"],
    ["pair", "CAB-R", "right cabinet"],
    ["pair", "L", "left speaker"],
    ["shipment", "3", "carton 3"],
    ["carton", "PAIR", ""],
    ["cabinet", "F4", "face leaf 4"],
    ["crossover", "L1", "position L1"],
  ])("%s at %s → %j", (kind, position, words) => {
    expect(positionWords(kind, position)).toBe(words);
  });
});

describe("subjectWords", () => {
  test.each([
    [{ subjectKind: "item", subjectName: CARTON, subjectItemKind: "carton", data: {} }, { kind: "Carton", name: CARTON, serial: CARTON }, `Carton ${CARTON}`],
    [{ subjectKind: "item", subjectName: null, subjectItemKind: null, data: { identity: PAIR } }, { kind: "Item", name: PAIR, serial: PAIR }, `Item ${PAIR}`],
    [{ subjectKind: "user", subjectName: "Ann Webb", data: { email: "ann@x.test" } }, { kind: "User", name: "Ann Webb", serial: null }, "User Ann Webb"],
    [{ subjectKind: "model", subjectName: "PW2 Parlour Two", data: {} }, { kind: "Model", name: "PW2 Parlour Two", serial: null }, "Model PW2 Parlour Two"],
    [{ subjectKind: "machine_token", subjectName: null, data: { name: "Bench 1" } }, { kind: "Machine token", name: "Bench 1", serial: null }, "Machine token Bench 1"],
    [{ subjectKind: "set", subjectName: null, data: {} }, { kind: "Matched set", name: null, serial: null }, "Matched set (no longer in the register)"],
  ])("%j", (event, words, label) => {
    expect(subjectWords(event)).toEqual(words);
    expect(subjectLabel(event)).toBe(label);
  });
});
