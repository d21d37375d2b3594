/** Display helpers for the Source screen. */
export function formatBytes(bytes: number): string {
  if (bytes < 1024) return `${bytes} B`;
  if (bytes < 1024 * 1024) return `${(bytes / 1024).toFixed(1)} KB`;
  if (bytes < 1024 ** 3) return `${(bytes / 1024 ** 2).toFixed(1)} MB`;
  return `${(bytes / 1024 ** 3).toFixed(2)} GB`;
}

export function formatSeconds(s: number): string {
  if (s < 120) return `${s.toFixed(1)} s`;
  const m = Math.floor(s / 60);
  return `${m} min ${Math.round(s - 60 * m)} s`;
}

export const shortFingerprint = (hex: string) => `${hex.slice(0, 12)}…${hex.slice(-6)}`;

/**
 * The storage meter's numbers: the share of the quota in use, as text and as the bar's fill width. A used share too
 * small to see still fills a sliver (0.5 % of the bar) so the bar reads "almost empty", never "nothing" or "full";
 * an unknown or zero quota fills nothing.
 */
export function storageShare(usageBytes: number, quotaBytes: number): { fraction: number; text: string; fillPercent: number } {
  if (!(quotaBytes > 0) || !(usageBytes >= 0)) return { fraction: 0, text: 'unknown share', fillPercent: 0 };
  const fraction = Math.min(1, usageBytes / quotaBytes);
  const percent = fraction * 100;
  const text = usageBytes === 0 ? '0 %' : percent < 0.01 ? 'under 0.01 %' : percent < 10 ? `${percent.toFixed(2)} %` : `${percent.toFixed(0)} %`;
  const fillPercent = usageBytes === 0 ? 0 : Math.max(0.5, percent);
  return { fraction, text, fillPercent };
}
