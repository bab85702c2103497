// `npm run restore -- <backup folder> [--replace] [--check]`: restores a backup into a stopped
// instance (README, "Backups"). --check only checks the backup and changes nothing.
import { databaseUrl } from "../db/index";
import { BackupError, checkBackup, restoreBackup } from "../lib/audit/backup";
import { uploadsDir } from "../lib/uploads/index";

const args = process.argv.slice(2);
const dir = args.find((a) => !a.startsWith("--"));
if (!dir) {
  console.error("Name the backup folder: npm run restore -- backups/twinleaf-… [--replace] [--check]");
  process.exit(2);
}

try {
  if (args.includes("--check")) {
    const { problems } = await checkBackup(dir);
    if (problems.length) {
      console.error(`The backup cannot be restored:\n- ${problems.join("\n- ")}`);
      process.exitCode = 1;
    } else console.log("The backup checks intact: checksums, database integrity, foreign keys, row counts and the audit chain.");
  } else {
    const { manifest, keptAs } = await restoreBackup({ dir, url: databaseUrl(), uploadsDir: uploadsDir(), replace: args.includes("--replace") });
    console.log(`Restored the backup taken ${manifest.takenAt} into ${databaseUrl()}; newest event ${manifest.auditHead?.id ?? "none"}.`);
    if (keptAs) console.log(`The database it replaced is kept as ${keptAs}.`);
  }
} catch (e) {
  console.error(e instanceof BackupError ? e.message : e);
  process.exitCode = 1;
}
