/**
 * The workshop as a party to a shipment: the name and address the carton label's supplier block
 * and the delivery note print. From TWINLEAF_WORKSHOP_NAME and TWINLEAF_WORKSHOP_ADDRESS (street
 * lines, then postcode and town, separated by "|" or new lines); unset, the demo's invented workshop.
 */
import { countryName } from "@/lib/workshop/countries";

export interface Party {
  name: string;
  lines: string[];
}

export const WORKSHOP_NAME_SETTING = "TWINLEAF_WORKSHOP_NAME";
export const WORKSHOP_ADDRESS_SETTING = "TWINLEAF_WORKSHOP_ADDRESS";

/** The invented demo workshop. */
const DEMO_WORKSHOP: Party = { name: "Twinleaf Demonstration Workshop", lines: ["Unit 4, Alder Yard", "Example Lane", "EX1 2MP Exampleton"] };

export function workshopParty(env: Record<string, string | undefined> = process.env): Party {
  const name = env[WORKSHOP_NAME_SETTING]?.trim();
  const address = env[WORKSHOP_ADDRESS_SETTING]?.trim();
  if (!name) return DEMO_WORKSHOP;
  return { name, lines: (address ?? "").split(/\s*(?:\||\r?\n)\s*/).filter(Boolean) };
}

/**
 * A dealer's delivery address as lines: street lines, then "postcode town", then the country's
 * name in capitals on a line of its own (the usual way for a parcel crossing a border, from
 * memory of the UPU's addressing guidance), never its ISO code.
 */
export function dealerLines(d: { address: string; postcode: string; city: string; country: string }): string[] {
  const country = d.country.trim() ? countryName(d.country.trim()).toUpperCase() : "";
  return [...d.address.split(/\r?\n/).map((l) => l.trim()).filter(Boolean), [d.postcode, d.city].map((v) => v.trim()).filter(Boolean).join(" "), country].filter(Boolean);
}
