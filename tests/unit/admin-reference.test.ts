/**
 * The admin's reference-data validators: a pair's GTIN-14 and its GS1 check digit (with cdigit as a
 * second opinion), ISO 3166-1 country codes, position codes used once across a model's drive-unit,
 * crossover and trim positions, colour references, and the model form's numbers.
 */
import { gtin as cdigitGtin } from "cdigit";
import { describe, expect, test } from "vitest";
import { countryProblem } from "@/lib/workshop/countries";
import { BLANK_MODEL_SPEC, changedFields, gtinProblem, modelSpecSchema, positionClashes } from "@/lib/workshop/model-spec";
import { colourRefProblem, dealerSchema, finishSchema } from "@/lib/workshop/reference-schemas";
import { seededRandom } from "../fixtures/random";

describe("a pair's GTIN-14", () => {
  test.each([
    // docs/REFERENCES.md, § GS1: valid GTIN-14s published by GS1.
    ["09521234543213", null],
    ["95012345678903", null],
    ["03453120000011", null],
    // docs/REFERENCES.md, § GS1: GS1's worked example 629104150021 → 3, as a GTIN-14 with a leading zero.
    ["06291041500213", null],
    // The same with the check digit changed: GS1's mod-10 gives 3 (docs/REFERENCES.md, § GS1).
    ["09521234543214", "The last digit is the check digit: for 0952123454321 it is 3, not 4. Check the number against the GS1 allocation."],
    ["06291041500210", "The last digit is the check digit: for 0629104150021 it is 3, not 0. Check the number against the GS1 allocation."],
    // 730001100001 → 7 (docs/REFERENCES.md, § GS1), padded to 13 data digits.
    ["07300011000010", "The last digit is the check digit: for 0730001100001 it is 7, not 0. Check the number against the GS1 allocation."],
    ["6291041500213", "A pair's GTIN has 14 digits; this one has 13. Put zeros in front of a shorter GTIN."],
    ["0952123454321X", "A GTIN is digits only."],
  ])("%s → %s", (gtin, problem) => {
    expect(gtinProblem(gtin)).toBe(problem);
  });

  test("agrees with cdigit (docs/REFERENCES.md, § Independent libraries) on 2,000 random GTIN-14s, half with a slipped digit", () => {
    const random = seededRandom(1415);
    for (let i = 0; i < 2000; i++) {
      const data = Array.from({ length: 13 }, () => Math.floor(random() * 10)).join("");
      const good = `${data}${cdigitGtin.compute(data)}`;
      const candidate = i % 2 ? `${data}${(Number(good[13]) + 1 + Math.floor(random() * 9)) % 10}` : good;
      expect(gtinProblem(candidate) === null, candidate).toBe(cdigitGtin.validate(candidate));
    }
  });
});

describe("country codes", () => {
  test.each([
    // docs/REFERENCES.md, § Countries (ISO 3166-1): assigned alpha-2 codes.
    ["GB", null],
    ["fr", null],
    ["NO", null],
    // docs/REFERENCES.md, § Countries (ISO 3166-1): UK and EL are exceptionally reserved, not assigned.
    ["UK", "UK is not an ISO 3166-1 code: United Kingdom is GB."],
    ["EL", "EL is not an ISO 3166-1 code: Greece is GR."],
    // docs/REFERENCES.md, § Countries (ISO 3166-1): XX is user-assigned, never a country.
    ["XX", "XX is not an ISO 3166-1 country code. Check the code, e.g. GB, FR, DE."],
    ["GBR", "Give the country as its two-letter ISO 3166-1 code, e.g. GB, FR, DE."],
    ["", "Give the country as its two-letter ISO 3166-1 code, e.g. GB, FR, DE."],
  ])("%j → %s", (code, problem) => {
    expect(countryProblem(code)).toBe(problem);
  });
});

describe("position codes across drive units, crossovers and trim parts", () => {
  const base = { positions: [{ position: "T", partType: "tweeter" as const, count: 1 }], crossovers: [{ position: "XO", count: 1 }], trimPositions: [] as { position: string; label: string; count: number }[] };
  test.each([
    ["all different", base, []],
    ["a drive-unit code twice", { ...base, positions: [...base.positions, { position: "T", partType: "bass" as const, count: 1 }] }, ["T"]],
    ["a trim code that is a drive-unit code", { ...base, trimPositions: [{ position: "T", label: "Top", count: 1 }] }, ["T"]],
    ["a trim code that is a crossover code", { ...base, trimPositions: [{ position: "XO", label: "Plate", count: 1 }] }, ["XO"]],
  ])("%s", (_name, spec, clashing) => {
    // Common practice: a position code names one place in a speaker, whatever sits there.
    expect(positionClashes(spec).map((c) => c.code)).toEqual(clashing);
  });
});

describe("the model form", () => {
  const good = { ...BLANK_MODEL_SPEC, code: "pw2", name: "Test", minLeafLengthMm: "640", minLeafWidthMm: "150", pairGtin: "09521234543213" };
  const issues = (over: Record<string, unknown>) => {
    const r = modelSpecSchema.safeParse({ ...good, ...over });
    return r.success ? [] : r.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`);
  };
  test.each([
    ["a valid model", {}, []],
    ["a negative finished-pair limit", { pairResponseLimitDb: "-1" }, ["pairResponseLimitDb: The finished pair limit must be more than 0 dB."]],
    ["a negative mismatch limit", { tolerances: [{ partType: "tweeter", mismatchLimitDb: "-0.5" }, { partType: "bass", mismatchLimitDb: "0.75" }] }, ["tolerances.0.mismatchLimitDb: The mismatch limit must be more than 0 dB."]],
    ["a warranty over 600 months", { warrantyMonths: "601" }, ["warrantyMonths: The warranty must be at most 600 months."]],
    ["a code of five characters", { code: "PW200" }, ["code: The code is 2 to 4 capital letters or digits, e.g. PW2: it goes into every serial."]],
    ["no XO crossover", { crossovers: [{ position: "XO-B", count: 1 }] }, ["crossovers: Every model has the crossover position XO: assembly fits the board there."]],
    ["the range upside down", { responseMinHz: "5000", responseMaxHz: "100" }, ["responseMaxHz: The highest frequency must be above the lowest."]],
    ["a trim code used by the crossover", { trimPositions: [{ position: "XO", label: "Plate", count: 1 }] }, ["trimPositions: XO is used twice (in crossover positions and trim positions): give each position its own code."]],
    ["a part type without a limit", { tolerances: [{ partType: "tweeter", mismatchLimitDb: 0.5 }] }, ["tolerances: Give a mismatch limit for every part type the model holds (bass has none)."]],
  ])("%s", (_name, over, expected) => {
    // The rules of the form (lib/workshop/model-spec.ts); the numbers are the form's own bounds.
    expect(issues(over)).toEqual(expected);
  });

  test("a code is read in capitals and the numbers as numbers", () => {
    const r = modelSpecSchema.parse(good);
    expect([r.code, r.minLeafLengthMm, r.positions[0]!.count]).toEqual(["PW2", 640, 1]);
  });

  test.each([
    ["name", { name: "Other" }, ["name"]],
    ["a position's count", { positions: [{ position: "T", partType: "tweeter", count: 2 }, { position: "B", partType: "bass", count: 1 }] }, ["drive-unit positions"]],
    ["nothing", {}, []],
  ])("what changed: %s", (_name, over, words) => {
    expect(changedFields(BLANK_MODEL_SPEC, { ...BLANK_MODEL_SPEC, ...over } as typeof BLANK_MODEL_SPEC)).toEqual(words);
  });
});

describe("finishes and dealers", () => {
  test.each([
    ["#3E4A52", null],
    ["RAL 7016", null],
    ["#3E4A5", "An sRGB reference is # and six hex digits, e.g. #3E4A52."],
    ["", "Give the colour's reference: an sRGB hex such as #3E4A52, or its colour-card reference."],
    ["dark grey", "Give an sRGB hex (#3E4A52) or a colour-card reference in capitals and digits (RAL 7016)."],
  ])("colour reference %j → %s", (ref, problem) => {
    // sRGB hex notation (IEC 61966-2-1 colours written as CSS hex); RAL-style card references: common practice.
    expect(colourRefProblem(ref)).toBe(problem);
  });

  test.each([
    ["a species", { kind: "veneer", code: "wal", name: "Black walnut", botanicalName: "Juglans nigra", cut: "crown" }, null],
    ["a species without its botanical name", { kind: "veneer", code: "WAL", name: "Black walnut" }, "botanicalName"],
    ["a species with an unknown cut", { kind: "veneer", code: "WAL", name: "Black walnut", botanicalName: "Juglans nigra", cut: "diagonal" }, "cut"],
    ["a colour", { kind: "lacquer", code: "LSL", name: "Estuary Slate", colourRef: "#3E4A52" }, null],
    ["a colour without a reference", { kind: "lacquer", code: "LSL", name: "Estuary Slate" }, "colourRef"],
  ])("finish: %s", (_name, input, field) => {
    const r = finishSchema.safeParse(input);
    expect(r.success ? null : String(r.error.issues[0]!.path[0])).toBe(field);
  });

  test.each([
    ["a good dealer", { country: "FR" }, null],
    ["UK for the United Kingdom", { country: "UK" }, "UK is not an ISO 3166-1 code: United Kingdom is GB."],
    ["XX", { country: "XX" }, "XX is not an ISO 3166-1 country code. Check the code, e.g. GB, FR, DE."],
    ["a bad e-mail", { email: "orders at shop" }, "Enter a whole e-mail address, like name@example.test."],
  ])("dealer: %s", (_name, over, message) => {
    // Country codes: docs/REFERENCES.md, § Countries (ISO 3166-1).
    const r = dealerSchema.safeParse({ code: "TST", name: "Test shop", address: "1 Test Street", postcode: "T1", city: "Testby", country: "GB", email: "orders@shop.test", ...over });
    expect(r.success ? null : r.error.issues[0]!.message).toBe(message);
  });
});
