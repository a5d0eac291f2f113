const KIB = 1024;
const MIB = 1024 * KIB;

/** A byte count as people read file sizes: "812 B", "14.2 KiB", "500 MiB". */
export function formatBytes(bytes: number): string {
  if (bytes < KIB) return `${bytes} B`;
  return bytes < MIB ? `${+(bytes / KIB).toFixed(1)} KiB` : `${+(bytes / MIB).toFixed(1)} MiB`;
}
