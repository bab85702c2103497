/** Sizes of files and request bodies in words ("2 MB", "64 KB"), binary multiples as the limits are set. */
export const KiB = 1024;
export const MiB = 1024 * KiB;

export function formatSize(bytes: number): string {
  const trim = (n: number) => (Math.round(n * 10) / 10).toString();
  if (bytes >= MiB) return `${trim(bytes / MiB)} MB`;
  if (bytes >= 1024) return `${trim(bytes / 1024)} KB`;
  return `${bytes} ${bytes === 1 ? "byte" : "bytes"}`;
}
