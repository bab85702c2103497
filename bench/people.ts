/**
 * Invented dealers, owners and tracking numbers for the synthetic register (bench/register.ts).
 * Names are made of syllables by a seeded generator: any likeness to a real person, shop or place
 * is chance. Never part of `npm test`.
 */
import type { Rng } from "./register";

const GIVEN = [
  "Ada", "Anders", "Åsa", "Bram", "Carys", "Dagny", "Edvin", "Elin", "Emrys", "Fenna", "Gideon", "Greta", "Hallam", "Ilse", "Iver",
  "Jérôme", "Jorun", "Kasimir", "Linnea", "Lorcan", "Maren", "Matthias", "Nell", "Oskar", "Petra", "Quentin", "Rhoswen", "Sander",
  "Solveig", "Tamsin", "Teodor", "Ursel", "Valter", "Wenna", "Ysolde", "Zoë", "Aurelio", "Benedikt", "Céline", "Dorian",
];
const HEADS = ["Ash", "Brack", "Cald", "Dun", "Elm", "Fern", "Gar", "Hol", "Ing", "Kel", "Lark", "Mor", "Nor", "Ost", "Pen", "Quill", "Ros", "Sel", "Tor", "Ul", "Var", "Wes", "Yar", "Brem", "Corr", "Drey", "Hask", "Lund", "Mar", "Tarn"];
const SURNAME_TAILS = ["by", "ford", "ley", "mere", "ton", "well", "wick", "worth", "stead", "holm", "dal", "berg", "lund", "hagen", "ard", "ing", "ow", "ett"];
const TOWN_TAILS = ["bridge", "minster", "haven", "field", "wick", "moor", "stoke", "vik", "fjord", "dorf", "ville", "heim", "sund", "ness", "combe"];
const COUNTRIES = ["GB", "FR", "DE", "NL", "NO", "SE", "DK", "BE", "IE", "AT"];
const SHOP_WORDS = ["Hi-Fi", "Audio", "Listening Rooms", "Sound Studio", "Audio House", "Hören", "Son", "Geluid", "Lyd", "Music Room"];

const fold = (s: string) => s.normalize("NFD").replace(/[\u0300-\u036f]/g, "").toLowerCase();

function word(rng: Rng, tails: readonly string[]): string {
  return `${rng.pick(HEADS)}${rng.pick(tails)}`;
}

export interface InventedDealer {
  code: string;
  name: string;
  city: string;
  country: string;
  email: string;
}

/** `count` dealers with distinct three-letter codes outside `taken`. */
export function inventedDealers(rng: Rng, count: number, taken: Set<string>): InventedDealer[] {
  const out: InventedDealer[] = [];
  const codes = new Set(taken);
  while (out.length < count) {
    const place = word(rng, SURNAME_TAILS);
    const name = `${place} ${rng.pick(SHOP_WORDS)}`;
    const code = Array.from({ length: 3 }, () => "ABCDEFGHJKLMNPRSTVWXYZ"[rng.int(22)]).join("");
    if (codes.has(code)) continue;
    codes.add(code);
    out.push({ code, name, city: word(rng, TOWN_TAILS), country: rng.pick(COUNTRIES), email: `shop@${fold(place)}-${code.toLowerCase()}.test` });
  }
  return out;
}

export interface InventedOwner {
  name: string;
  email: string | null;
  town: string;
  country: string;
}

/** `count` owners; about one in eight left no e-mail. */
export function inventedOwners(rng: Rng, count: number): InventedOwner[] {
  return Array.from({ length: count }, (_, i) => {
    const given = rng.pick(GIVEN);
    const surname = word(rng, SURNAME_TAILS);
    const email = rng.int(8) === 0 ? null : `${fold(given)}.${fold(surname)}${i % 97}@owners.test`;
    return { name: `${given} ${surname}`, email, town: word(rng, TOWN_TAILS), country: rng.pick(COUNTRIES) };
  });
}

/**
 * A tracking number in the shape of the UPU S10 standard for postal items: two letters, eight
 * digits, a check digit and the country's ISO 3166 code. The check digit (from memory of UPU
 * S10, not checked against the standard's text): weights 8 6 4 2 3 5 9 7, C = 11 − (sum mod 11),
 * with 10 → 0 and 11 → 5.
 */
export function s10Tracking(rng: Rng): string {
  const digits = Array.from({ length: 8 }, () => rng.int(10));
  const sum = digits.reduce((s, d, i) => s + d * [8, 6, 4, 2, 3, 5, 9, 7][i]!, 0);
  const c = 11 - (sum % 11);
  const check = c === 10 ? 0 : c === 11 ? 5 : c;
  return `${rng.pick(["CP", "EE", "LX", "RR", "VV"])}${digits.join("")}${check}${rng.pick(COUNTRIES)}`;
}
