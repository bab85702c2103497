// `npm run backup [-- --into <folder>]`: a consistent backup of the register while it runs (see
// README, "Backups"). The folder defaults to BACKUP_DIR or ./backups.
import { databaseUrl } from "../db/index";
import { BackupError, takeBackup } from "../lib/audit/backup";
import { uploadsDir } from "../lib/uploads/index";

const args = process.argv.slice(2);
const at = args.indexOf("--into");
const into = (at >= 0 ? args[at + 1] : undefined) ?? process.env.BACKUP_DIR ?? "backups";

try {
  const { dir, manifest } = await takeBackup({ url: databaseUrl(), uploadsDir: uploadsDir(), into });
  const rows = Object.values(manifest.tables).reduce((a, b) => a + b, 0);
  console.log(`Backed up to ${dir}`);
  console.log(`${Object.keys(manifest.tables).length} tables, ${rows} rows, ${Object.keys(manifest.files).length} files; newest event ${manifest.auditHead?.id ?? "none"}.`);
} catch (e) {
  console.error(e instanceof BackupError ? e.message : e);
  process.exitCode = 1;
}
