/** Nonconformances in words. The sentences are Twinleaf's own; seq 0 is the final pair test (lib/lab/final-test.ts). */
import { describe, expect, test } from "vitest";
import { describeEvent } from "@/lib/events/describe";
import { dispositionPhrase, dispositionSentence, ncWhere, type AfterDisposition } from "@/lib/route/words";

describe("where a nonconformance was found", () => {
  test.each([
    [4, "Machine sanding", "at step 4, Machine sanding"],
    [4, null, "at step 4"],
    [0, "Final pair test", "at the final pair test"],
    [0, null, "at the final pair test"],
  ])("seq %i (%s) → %s", (seq, name, words) => {
    expect(ncWhere(seq, name)).toBe(words);
  });

  test.each([
    [{ code: "NC-2612-001", seq: 0, step: "Final pair test", finding: "left and right differ" }, "opened nonconformance NC-2612-001 at the final pair test: left and right differ"],
    [{ code: "NC-2612-002", seq: 2, step: "Trimming", finding: "Trim deviation 0.3 mm" }, "opened nonconformance NC-2612-002 at step 2, Trimming: Trim deviation 0.3 mm"],
    [{ code: "NC-2612-003", finding: "recorded before seqs were kept" }, "opened nonconformance NC-2612-003: recorded before seqs were kept"],
  ])("the event log: %j", (data, phrase) => {
    expect(describeEvent("nc.opened", data)).toBe(phrase);
  });

  test.each([
    [{ code: "NC-1", disposition: "rework", reworkToSeq: 0 }, "decided nonconformance NC-1: rework: adjust and test again"],
    [{ code: "NC-2", disposition: "rework", reworkToSeq: 4 }, "decided nonconformance NC-2: rework back to step 4"],
    [{ code: "NC-3", disposition: "use_as_is", reworkToSeq: null }, "decided nonconformance NC-3: use as is (deviation approved)"],
    [{ code: "NC-4", disposition: "scrap", scrapped: "C-PW2-26-00007-K" }, "decided nonconformance NC-4: scrap the cabinet C-PW2-26-00007-K"],
    [{ code: "NC-5", disposition: "something_else" }, "decided nonconformance NC-5"],
  ])("the event log: %j", (data, phrase) => {
    expect(describeEvent("nc.dispositioned", data)).toBe(phrase);
  });
});

describe("the confirmation after a disposition", () => {
  const base: AfterDisposition = { code: "NC-2612-003", disposition: "rework", seq: 4, holder: "pair", stillOpen: [] };
  test.each<[string, AfterDisposition, string]>([
    ["rework to a named step", { ...base, reworkToSeq: 4, reworkToName: "Sanding" }, "NC-2612-003: rework back to step 4, Sanding. The pair is released."],
    ["another still open", { ...base, reworkToSeq: 2, reworkToName: "Trimming", stillOpen: ["NC-2612-004"] }, "NC-2612-003: rework back to step 2, Trimming. The pair stays on hold: NC-2612-004 is still open."],
    ["use as is", { ...base, disposition: "use_as_is" }, "NC-2612-003: use as is (deviation approved). The pair is released."],
    ["scrap the left cabinet", { ...base, disposition: "scrap", scrapped: { side: "L", identity: "C-PW2-26-00011-3" } }, "NC-2612-003: scrap the left cabinet C-PW2-26-00011-3. The pair is unpartnered until quality signs off a new partner."],
    ["a lone lacquer cabinet", { ...base, disposition: "use_as_is", holder: "cabinet" }, "NC-2612-003: use as is (deviation approved). The cabinet is released."],
    ["final test, rework", { ...base, seq: 0, reworkToSeq: 0 }, "NC-2612-003: rework: adjust and test again. The pair is released for its final test again."],
    ["final test, use as is", { ...base, seq: 0, disposition: "use_as_is" }, "NC-2612-003: use as is (deviation approved). The pair is ready to pack."],
  ])("%s", (_what, facts, sentence) => {
    expect(dispositionSentence(facts)).toBe(sentence);
  });

  test("the phrase alone, for the quality page's table", () => {
    expect(dispositionPhrase({ disposition: "rework", seq: 4, reworkToSeq: 3 })).toBe("rework back to step 3");
  });
});
