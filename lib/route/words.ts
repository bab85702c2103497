/**
 * Nonconformances in words: where one was found and what quality decided. Pure, so pages, the
 * event log's phrases and the server's messages say it the same way. Seq 0 is the final pair test
 * (lib/lab/final-test.ts opens its nonconformances there), never "step 0".
 */
import type { Side } from "@/lib/vocabulary/sides";

export type Disposition = "rework" | "use_as_is" | "scrap" | "entry_error";

/** The seq the final pair test's nonconformances carry. */
export const FINAL_TEST_SEQ = 0;

/** "step 4, Sanding" (or "step 4" without its name); "the final pair test" for seq 0. */
export function ncStepName(seq: number, name?: string | null): string {
  if (seq === FINAL_TEST_SEQ) return "the final pair test";
  return name ? `step ${seq}, ${name}` : `step ${seq}`;
}

/** "at step 4, Sanding", "at the final pair test". */
export const ncWhere = (seq: number, name?: string | null) => `at ${ncStepName(seq, name)}`;

export const DISPOSITION_WORDS: Record<Disposition, string> = { rework: "rework", use_as_is: "use as is", scrap: "scrap", entry_error: "entry error" };

export interface DispositionFacts {
  disposition: Disposition;
  /** The nonconformance's own seq (0: the final pair test), where known. */
  seq?: number;
  reworkToSeq?: number | null;
  /** The name of the step rework goes back to, where known. */
  reworkToName?: string | null;
  scrapped?: { side: Side | null; identity: string } | null;
}

/** What was decided: "rework back to step 4, Sanding", "rework: adjust and test again", "use as is (deviation approved)", "scrap the right cabinet C-…". */
export function dispositionPhrase(f: DispositionFacts): string {
  switch (f.disposition) {
    case "rework":
      if (f.seq === FINAL_TEST_SEQ || f.reworkToSeq === FINAL_TEST_SEQ) return "rework: adjust and test again";
      return f.reworkToSeq != null ? `rework back to ${ncStepName(f.reworkToSeq, f.reworkToName)}` : "rework";
    case "use_as_is":
      return "use as is (deviation approved)";
    case "entry_error":
      return "closed as an entry error (the reading was mistyped and has been corrected)";
    case "scrap": {
      if (!f.scrapped) return "scrap";
      const which = f.scrapped.side === "L" ? "the left cabinet" : f.scrapped.side === "R" ? "the right cabinet" : "the cabinet";
      return `scrap ${which} ${f.scrapped.identity}`;
    }
  }
}

export interface AfterDisposition extends DispositionFacts {
  code: string;
  /** What the nonconformance held: a pair, a lacquer cabinet on the route by itself, or a trim part. */
  holder: "pair" | "cabinet" | "trim part";
  /** Nonconformances of the same pair still open afterwards. */
  stillOpen: string[];
}

/**
 * The confirmation quality reads after recording a disposition, e.g.
 * "NC-2612-003: rework back to step 4, Sanding. The pair is released."
 */
export function dispositionSentence(f: AfterDisposition): string {
  const head = `${f.code}: ${dispositionPhrase(f)}.`;
  const it = f.holder === "pair" ? "The pair" : f.holder === "cabinet" ? "The cabinet" : "The trim part";
  if (f.disposition === "scrap") {
    return f.holder === "pair" ? `${head} The pair is unpartnered until quality signs off a new partner.` : `${head} It leaves the route.`;
  }
  if (f.stillOpen.length) {
    return `${head} ${it} stays on hold: ${f.stillOpen.join(", ")} ${f.stillOpen.length === 1 ? "is" : "are"} still open.`;
  }
  if (f.seq === FINAL_TEST_SEQ) {
    return f.disposition === "use_as_is" ? `${head} The pair is ready to pack.` : `${head} The pair is released for its final test again.`;
  }
  return `${head} ${it} is released.`;
}
