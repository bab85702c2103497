import { Fragment, type ReactNode } from "react";
import { parseLeafIdentity, parseSerial } from "@/lib/serials/format";
import { SerialLink } from "./serial-link";

// A serial as lib/serials/format writes it (a leaf adds "/NN"); only those whose check character
// fits become links, so a typed slip quoted in a sentence is left as text.
const SERIAL_IN_TEXT = /\b[CDXSPKHF]-[A-Z0-9]{2,4}-\d{2}-\d{5,9}-[0-9A-Z*](?:\/\d{2})?(?![\w/-])/g;

const isRealSerial = (s: string) => (s.includes("/") ? parseLeafIdentity(s)?.valid : parseSerial(s)?.valid) === true;

/** A sentence with every serial in it shown as a link to its item (serials never break across lines). */
export function SerialText({ text }: { text: string }) {
  const out: ReactNode[] = [];
  let last = 0;
  for (const m of text.matchAll(SERIAL_IN_TEXT)) {
    if (!isRealSerial(m[0])) continue;
    out.push(<Fragment key={`t${last}`}>{text.slice(last, m.index)}</Fragment>);
    out.push(<SerialLink key={`s${m.index}`} identity={m[0]} bold={false} />);
    last = m.index + m[0].length;
  }
  out.push(<Fragment key={`t${last}`}>{text.slice(last)}</Fragment>);
  return <span>{out}</span>;
}
