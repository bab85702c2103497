// The audit check's answer in words, shared by the admin page and `npm run audit:verify`. Pure.
import type { AuditReport } from "./verify";

export interface AuditSummary {
  /** One sentence: "intact", or what is wrong first. */
  headline: string;
  /** Every problem found, first break first, in plain words. */
  problems: string[];
}

export function summarizeAudit(report: AuditReport): AuditSummary {
  const problems: string[] = [];
  if (report.columns) problems.push(report.columns);
  if (report.firstBreak) {
    problems.push(report.firstBreak.message);
    if (report.moreBreaks > 0) problems.push(`The chain breaks in ${report.moreBreaks} more ${report.moreBreaks === 1 ? "place" : "places"} after that.`);
  }
  for (const t of report.triggers) problems.push(t.message);
  if (report.anchor && !report.anchor.holds) problems.push(report.anchor.message);
  const count = `${report.events} ${report.events === 1 ? "event" : "events"}`;
  const headline = report.intact
    ? `Intact: ${count}, each chained to the one before it, and every protective rule in place.`
    : `Not intact: ${problems[0] ?? "a check failed."}`;
  return { headline, problems };
}
