/**
 * A benchmark's scratch folder: made under the system's temporary folder, removed when the run ends
 * or is interrupted (Ctrl+C, SIGTERM), kept when `keep` (its database's path is printed).
 */
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";

export interface Scratch {
  dir: string;
  /** The register's database file in it. */
  file: string;
  /** Removes the folder (once), or says where it was kept. */
  cleanUp: () => void;
}

export function scratchFolder(prefix: string, keep: boolean): Scratch {
  const dir = mkdtempSync(join(tmpdir(), prefix));
  const file = join(dir, "register.db");
  let cleaned = false;
  const cleanUp = () => {
    if (cleaned) return;
    cleaned = true;
    if (keep) console.log(`kept ${file}`);
    else rmSync(dir, { recursive: true, force: true });
  };
  for (const signal of ["SIGINT", "SIGTERM"] as const) {
    process.once(signal, () => {
      cleanUp();
      process.exit(130);
    });
  }
  return { dir, file, cleanUp };
}
