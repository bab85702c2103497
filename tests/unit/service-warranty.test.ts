/**
 * The warranty's arithmetic. Each end day below was worked by hand on the Gregorian calendar and
 * is checked against date-fns `addMonths` (an independent implementation of calendar-month
 * addition that clips to the month's last day) in the last test; day counts are plain calendar
 * differences (2024 is a leap year: 29 February exists; 2025 is not).
 */
import { addMonths, differenceInCalendarDays, format, parseISO } from "date-fns";
import { describe, expect, test } from "vitest";
import { warrantyWorking, workOutWarranty } from "@/lib/service/warranty";

describe("the last day covered", () => {
  test.each([
    // [shipped, months, end]  — worked by hand
    ["2024-03-15", 24, "2026-03-15"],
    ["2025-01-31", 1, "2025-02-28"], // 31 Jan + 1 month: February 2025 has 28 days
    ["2024-01-31", 1, "2024-02-29"], // leap year: 29 February
    ["2024-02-29", 12, "2025-02-28"], // no 29 February in 2025
    ["2024-08-31", 3, "2024-11-30"], // November has 30 days
    ["2023-10-31", 60, "2028-10-31"],
    ["2025-06-10", 0, "2025-06-10"], // no warranty: only the ship day itself
  ])("shipped %s, %i months → ends %s", (shippedOn, months, endsOn) => {
    const w = workOutWarranty({ shippedOn, registeredOn: null, months, receivedOn: shippedOn });
    expect(w.endsOn).toBe(endsOn);
    expect(w.startsOn).toBe(shippedOn);
    expect(w.rule).toBe("shipped");
  });
});

describe("in warranty on the day received", () => {
  test.each([
    // [shipped, registered, months, received, rule, inWarranty, daysLeft, daysOver] — worked by hand
    ["2024-03-15", null, 24, "2026-03-15", "shipped", true, 0, null], // the last day still counts
    ["2024-03-15", null, 24, "2026-03-16", "shipped", false, null, 1],
    ["2024-03-15", null, 24, "2026-03-05", "shipped", true, 10, null],
    ["2025-01-31", null, 1, "2025-03-01", "shipped", false, null, 1], // ends 28 Feb 2025
    ["2024-01-31", null, 1, "2024-03-01", "shipped", false, null, 1], // ends 29 Feb 2024
    // registered later than shipped: the later day counts (ends 2026-05-01)
    ["2024-03-15", "2024-05-01", 24, "2026-04-01", "registered", true, 30, null],
    // registered before the ship day (the dealer's pre-registration): the ship day counts
    ["2024-03-15", "2024-03-01", 24, "2026-03-16", "shipped", false, null, 1],
    // 2024-12-31 + 12 months = 2025-12-31; received 2026-02-01 is 32 days over
    ["2024-12-31", null, 12, "2026-02-01", "shipped", false, null, 32],
  ] as const)("shipped %s, registered %s, %i months, received %s", (shippedOn, registeredOn, months, receivedOn, rule, inWarranty, daysLeft, daysOver) => {
    const w = workOutWarranty({ shippedOn, registeredOn, months, receivedOn });
    expect({ rule: w.rule, inWarranty: w.inWarranty, daysLeft: w.daysLeft, daysOver: w.daysOver }).toEqual({ rule, inWarranty, daysLeft, daysOver });
  });

  test.each([[-1], [1.5]])("a period of %s months is refused", (months) => {
    expect(() => workOutWarranty({ shippedOn: "2024-01-01", registeredOn: null, months, receivedOn: "2024-02-01" })).toThrow(/whole number/);
  });
});

describe("checked against date-fns on every day of two years", () => {
  // date-fns is the independent check: parseISO + addMonths + differenceInCalendarDays, in UTC-free
  // calendar terms, against the noon-anchored arithmetic of lib/service/warranty.ts.
  const days: string[] = [];
  for (let d = parseISO("2023-01-01"); d < parseISO("2025-01-01"); d = new Date(d.getFullYear(), d.getMonth(), d.getDate() + 1)) days.push(format(d, "yyyy-MM-dd"));
  test.each([[1], [12], [24], [37]])("%i months", (months) => {
    for (const shippedOn of days) {
      const w = workOutWarranty({ shippedOn, registeredOn: null, months, receivedOn: "2026-06-30" });
      const end = addMonths(parseISO(shippedOn), months);
      expect(w.endsOn).toBe(format(end, "yyyy-MM-dd"));
      const gap = differenceInCalendarDays(end, parseISO("2026-06-30"));
      expect(w.inWarranty ? w.daysLeft : -w.daysOver!).toBe(gap);
    }
  });
});

test("the working says which rule applied", () => {
  const day = (iso: string) => iso;
  expect(warrantyWorking(workOutWarranty({ shippedOn: "2024-03-15", registeredOn: "2024-05-01", months: 24, receivedOn: "2026-04-01" }), day)).toEqual([
    "Starts 2024-05-01: the owner registered the pair after it shipped on 2024-03-15, and the later day counts.",
    "Period: 24 months, so it covers up to and including 2026-05-01.",
    "Received 2026-04-01: in warranty, with 30 days left.",
  ]);
  expect(warrantyWorking(workOutWarranty({ shippedOn: "2024-03-15", registeredOn: null, months: 1, receivedOn: "2024-04-16" }), day)[2]).toBe("Received 2024-04-16: out of warranty, 1 day over.");
});
