import { describe, expect, test } from "vitest";
import {
  AIR_DENSITY,
  checkTsParams,
  fsFrom,
  litresToM3,
  m3ToLitres,
  qesFrom,
  qmsFrom,
  qtsFrom,
  SPEED_OF_SOUND,
  TS_FIELDS,
  vasFrom,
  type TsCheckResult,
} from "@/lib/acoustics";

/** Within half a unit of the last digit of a published value, e.g. "0.4329" → ±0.00005. */
function expectPublished(actual: number, published: string) {
  const decimals = published.includes(".") ? published.split(".")[1]!.length : 0;
  expect(Math.abs(actual - Number(published))).toBeLessThanOrEqual(0.5 * 10 ** -decimals + 1e-12);
}

const errorsOf = (r: TsCheckResult) => {
  if (r.ok) throw new Error(`expected errors, got ${JSON.stringify(r.values)}`);
  return r.fieldErrors;
};
const valuesOf = (r: TsCheckResult) => {
  if (!r.ok) throw new Error(`expected values, got ${JSON.stringify(r.fieldErrors)}`);
  return r;
};

describe("Thiele–Small relations: the worked example in docs/REFERENCES.md, § Loudspeaker parameters", () => {
  // Source: docs/REFERENCES.md, § Loudspeaker parameters, worked example:
  // Mms 15 g, Cms 1.2 mm/N, Bl 7 T·m, Re 6 Ω, Rms 1.18 N·s/m, Sd 133 cm²
  // → Fs 37.51 Hz, Qes 0.4329, Qms 2.996, Qts 0.3783, Vas 30.10 L (ρ 1.204 kg/m³, c 343.2 m/s).
  const mms = 15e-3; // kg
  const cms = 1.2e-3; // m/N
  const bl = 7;
  const re = 6;
  const rms = 1.18;
  const sd = 133e-4; // m²

  test("Fs 37.51 Hz", () => {
    expectPublished(fsFrom(mms, cms), "37.51");
  });

  test("Qes 0.4329 and Qms 2.996 from the computed Fs", () => {
    const fs = fsFrom(mms, cms);
    expectPublished(qesFrom(fs, mms, re, bl), "0.4329");
    expectPublished(qmsFrom(fs, mms, rms), "2.996");
  });

  test("Qts 0.3783 from the computed Qes and Qms", () => {
    const fs = fsFrom(mms, cms);
    expectPublished(qtsFrom(qesFrom(fs, mms, re, bl), qmsFrom(fs, mms, rms)), "0.3783");
  });

  test("Vas 30.10 L with ρ 1.204 kg/m³ and c 343.2 m/s pinned", () => {
    expect(AIR_DENSITY).toBe(1.204);
    expect(SPEED_OF_SOUND).toBe(343.2);
    expectPublished(m3ToLitres(vasFrom(sd, cms)), "30.10");
    expectPublished(m3ToLitres(vasFrom(sd, cms, 1.204, 343.2)), "30.10");
  });
});

describe("Thiele–Small relations: behaviour", () => {
  test("Vas scales with ρ·c² (made-up air, from the definition)", () => {
    expect(vasFrom(0.01, 1e-3, 2 * AIR_DENSITY, SPEED_OF_SOUND) / vasFrom(0.01, 1e-3)).toBeCloseTo(2, 12);
    expect(vasFrom(0.01, 1e-3, AIR_DENSITY, 2 * SPEED_OF_SOUND) / vasFrom(0.01, 1e-3)).toBeCloseTo(4, 12);
  });

  test("Qts of equal Qes and Qms is half of either", () => {
    expect(qtsFrom(0.8, 0.8)).toBeCloseTo(0.4, 15);
  });

  test("litres and cubic metres", () => {
    expect(m3ToLitres(0.0301)).toBeCloseTo(30.1, 12);
    expect(litresToM3(30.1)).toBeCloseTo(0.0301, 15);
  });

  test.each([
    () => qtsFrom(0, 3),
    () => fsFrom(-0.01, 1e-3),
    () => qesFrom(40, 0.015, 6, Number.NaN),
    () => qmsFrom(40, 0.015, 0),
    () => vasFrom(0.0133, 1.2e-3, 0),
  ])("refuses a value that is not a finite number above 0 (%#)", (f) => {
    expect(f).toThrow(/must be a finite number above 0/);
  });
});

describe("TS_FIELDS", () => {
  test("labels and units for the form, in order", () => {
    expect(TS_FIELDS.map((f) => [f.key, f.label, f.unit])).toEqual([
      ["fs", "Fs", "Hz"],
      ["qts", "Qts", ""],
      ["qes", "Qes", ""],
      ["qms", "Qms", ""],
      ["re", "Re", "Ω"],
      ["vas", "Vas", "L"],
      ["sensitivity", "Sensitivity", "dB SPL (2.83 V / 1 m)"],
    ]);
  });

  test("the sensitivity note says 2.83 V is 1 W only at 8 Ω (IEC 60268-5, via docs/REFERENCES.md, § Loudspeaker parameters)", () => {
    const hint = TS_FIELDS.find((f) => f.key === "sensitivity")!.hint!;
    expect(hint).toMatch(/1 W only into 8 Ω/);
    expect(hint).toMatch(/4 Ω it is 2 W/);
    // 2.83 V into 8 Ω: P = U²/R ≈ 1.001 W; into 4 Ω ≈ 2.002 W, +3.01 dB (docs/REFERENCES.md, § Loudspeaker parameters).
    expect(2.83 ** 2 / 8).toBeCloseTo(1, 2);
    expect(10 * Math.log10(2.83 ** 2 / 4 / (2.83 ** 2 / 8))).toBeCloseTo(3.01, 2);
  });
});

describe("checkTsParams", () => {
  // The worked example of docs/REFERENCES.md, § Loudspeaker parameters, rounded as published, as a user would type it.
  const example = { fs: 37.51, qes: 0.4329, qms: 2.996, re: 6, vas: 30.1, sensitivity: 87 };

  test("a good set passes, deriving a missing Qts from Qes and Qms", () => {
    const r = valuesOf(checkTsParams(example));
    expect(r.derived).toEqual(["qts"]);
    // docs/REFERENCES.md, § Loudspeaker parameters, gives Qts 0.3783 from the unrounded Qes and Qms; from the published 0.4329 and
    // 2.996 it comes out 0.37825, so allow one unit in the last published digit.
    expect(Math.abs(r.values.qts! - 0.3783)).toBeLessThan(1e-4);
    expect(r.values).toMatchObject(example);
  });

  test("a given Qts that agrees is kept", () => {
    const r = valuesOf(checkTsParams({ ...example, qts: 0.3783 }));
    expect(r.derived).toEqual([]);
    expect(r.values.qts).toBe(0.3783);
  });

  test("a Qts within 2 % passes; more than 2 % off is refused with the expected value", () => {
    const expected = (0.4329 * 2.996) / (0.4329 + 2.996);
    expect(checkTsParams({ ...example, qts: expected * 1.019 }).ok).toBe(true);
    expect(checkTsParams({ ...example, qts: expected * 0.981 }).ok).toBe(true);
    const errors = errorsOf(checkTsParams({ ...example, qts: 0.45 }));
    expect(Object.keys(errors)).toEqual(["qts"]);
    expect(errors.qts![0]).toMatch(/Qts 0\.45 does not agree with Qes and Qms: Qes·Qms\/\(Qes\+Qms\) = 0\.3782/); // 0.37825 from the rounded Qes and Qms, to 4 significant digits
    expect(errors.qts![0]).toMatch(/more than 2 %/);
    expect(checkTsParams({ ...example, qts: expected * 1.021 }).ok).toBe(false);
  });

  test("every field is optional; an empty set passes", () => {
    expect(checkTsParams({})).toEqual({ ok: true, values: {}, derived: [] });
    expect(checkTsParams({ fs: null, qts: undefined, vas: 12 })).toEqual({ ok: true, values: { vas: 12 }, derived: [] });
  });

  test("Qts without both Qes and Qms is kept, unless it is not below the one given", () => {
    expect(valuesOf(checkTsParams({ qts: 0.38, qes: 0.43 })).values).toEqual({ qts: 0.38, qes: 0.43 });
    expect(errorsOf(checkTsParams({ qts: 0.5, qes: 0.43 })).qts![0]).toMatch(/must be below Qes \(0\.43\)/);
    expect(errorsOf(checkTsParams({ qts: 3, qms: 3 })).qts![0]).toMatch(/must be below Qms \(3\)/);
  });

  test.each([
    ["fs", 4.9, /Fs \(Hz\) must be between 5 and 40000 Hz; 4\.9 looks mistyped/],
    ["fs", 40001, /between 5 and 40000 Hz/],
    ["qts", 0.04, /Qts must be between 0\.05 and 30;/],
    ["qes", 31, /Qes must be between 0\.05 and 30;/],
    ["qms", 0, /Qms must be between/],
    ["re", 0.4, /Re \(Ω\) must be between 0\.5 and 100 Ω/],
    ["re", 101, /between 0\.5 and 100 Ω/],
    ["vas", 0, /Vas \(L\) must be above 0 L and at most 10000 L/],
    ["vas", 10001, /at most 10000 L/],
    ["sensitivity", 59, /Sensitivity must be between 60 and 120 dB/],
    ["sensitivity", 121, /between 60 and 120 dB/],
    ["fs", Number.NaN, /Fs \(Hz\) must be a number/],
    ["re", Number.POSITIVE_INFINITY, /Re \(Ω\) must be a number/],
  ] as const)("refuses %s = %s", (key, value, message) => {
    const errors = errorsOf(checkTsParams({ [key]: value }));
    expect(Object.keys(errors)).toEqual([key]);
    expect(errors[key]![0]).toMatch(message);
  });

  test.each([
    ["fs", 5],
    ["fs", 40000],
    ["qes", 0.05],
    ["qms", 30],
    ["re", 0.5],
    ["re", 100],
    ["vas", 0.001],
    ["vas", 10000],
    ["sensitivity", 60],
    ["sensitivity", 120],
  ] as const)("accepts %s = %s at or inside the range", (key, value) => {
    expect(checkTsParams({ [key]: value }).ok).toBe(true);
  });

  test("several errors are reported together, and a bad Qes stops the Qts check", () => {
    const errors = errorsOf(checkTsParams({ fs: 1, re: 1000, qes: 50, qms: 3, qts: 0.4 }));
    expect(Object.keys(errors).sort()).toEqual(["fs", "qes", "re"]);
  });
});
