/**
 * What an area shows when a page fails or finds nothing (components/shell/area-error.tsx and
 * area-not-found.tsx): plain words, a way on, and nothing internal. Expected words are the
 * product's own; the areas come from lib/areas.ts.
 */
import { renderToStaticMarkup } from "react-dom/server";
import { describe, expect, test, vi } from "vitest";

const nav = vi.hoisted(() => ({ path: "/" }));
vi.mock("next/navigation", () => ({ usePathname: () => nav.path, useRouter: () => ({ push: () => {}, prefetch: () => {} }) }));

const { AreaError } = await import("@/components/shell/area-error");
const { AreaNotFound } = await import("@/components/shell/area-not-found");
const { paths } = await import("@/lib/paths");

const text = (html: string) => html.replace(/<[^>]+>/g, " ").replace(/\s+/g, " ").trim();

describe("AreaError", () => {
  test("shows a plain message, Try again and the way back, never the error itself", () => {
    const error = Object.assign(new Error("SQLITE_BUSY: database is locked at /srv/data/twinleaf.db"), { digest: "4188721093" });
    const html = renderToStaticMarkup(<AreaError areaKey="veneer" error={error} retry={() => {}} />);
    expect(text(html)).toContain("This page could not be shown");
    expect(text(html)).toContain("Try again");
    expect(html).toContain(`href="${paths.veneer}"`);
    expect(text(html)).toContain("Back to Veneer room");
    for (const secret of ["SQLITE", "locked", "/srv", "4188721093"]) expect(html).not.toContain(secret);
  });
});

describe("AreaNotFound", () => {
  const things = [
    { under: paths.item(""), what: "item", serial: true },
    { under: paths.owner(""), what: "owner" },
  ];

  test.each([
    [paths.item("P-PW2-26-00042-Q"), "No item P-PW2-26-00042-Q", "P-PW2-26-00042-Q"],
    [paths.item("F-WAL-26-00012-7/03"), "No item F-WAL-26-00012-7/03", "F-WAL-26-00012-7/03"],
    [paths.owner("0f9c2a61-7d0e-4f7a-9d55-2c1b6e7a9b10"), "This owner is not registered", null],
    [`${paths.item("")}${"X".repeat(40)}`, "This item is not registered", null],
    [`${paths.item("")}%E0%A4%A`, "This item is not registered", null],
    ["/register/somewhere", "This page is not registered", null],
  ])("at %s the heading is “%s”", (path, heading, serial) => {
    nav.path = path;
    const html = renderToStaticMarkup(<AreaNotFound areaKey="register" things={things} />);
    expect(text(/<h1[^>]*>(.*?)<\/h1>/s.exec(html)![1]!)).toBe(heading);
    if (serial) expect(html).toContain(`<span class="serial">${serial}</span>`);
    // An internal id is never repeated back.
    expect(html).not.toContain("0f9c2a61");
    expect(html).toContain(`href="${paths.register}"`);
  });
});
