// `npm run audit:verify`: checks the event log's chain and the database's protective triggers, and
// with `--backup <folder>` also that the log still holds, unchanged, the newest event of that backup.
// Prints "intact" or what is wrong first; exits 1 when anything is wrong. Reads only.
import { databaseUrl, openDb } from "../db/index";
import { readManifest } from "../lib/audit/backup";
import { summarizeAudit } from "../lib/audit/summary";
import { verifyAuditTrail } from "../lib/audit/verify";
import { formatWhen } from "../lib/format";

const args = process.argv.slice(2);
const at = args.indexOf("--backup");
const backupDir = at >= 0 ? args[at + 1] : undefined;
if (at >= 0 && !backupDir) {
  console.error("Name the backup folder after --backup.");
  process.exit(2);
}

const { client, db } = openDb(databaseUrl());
try {
  const manifest = backupDir ? await readManifest(backupDir) : null;
  const anchor = manifest?.auditHead ? { ...manifest.auditHead, source: `the backup of ${formatWhen(new Date(manifest.takenAt))}` } : null;
  const report = await verifyAuditTrail(db, { anchor });
  const { headline, problems } = summarizeAudit(report);
  console.log(headline);
  for (const p of problems.slice(1)) console.log(`- ${p}`);
  if (report.anchor?.holds) console.log(report.anchor.message);
  process.exitCode = report.intact ? 0 : 1;
} catch (e) {
  console.error(e instanceof Error ? e.message : e);
  process.exitCode = 2;
} finally {
  client.close();
}
