/** Moments as every page shows them: date, time and the time zone they are read in. */

const formats = new Map<string, Intl.DateTimeFormat>();

/**
 * "3 Dec 2026, 14:05 UTC": `timeZone` undefined reads the moment in the viewer's zone (then named
 * "GMT+1", "CET" and so on); `seconds` adds the seconds, for audit trails.
 */
export function formatDateTime(value: Date | string, timeZone?: string, seconds = false): string {
  const key = `${timeZone ?? ''}|${seconds}`;
  let format = formats.get(key);
  if (!format) {
    format = new Intl.DateTimeFormat('en-GB', {
      day: 'numeric',
      month: 'short',
      year: 'numeric',
      hour: '2-digit',
      minute: '2-digit',
      ...(seconds ? { second: '2-digit' } : {}),
      timeZoneName: 'short',
      ...(timeZone ? { timeZone } : {}),
    });
    formats.set(key, format);
  }
  return format.format(typeof value === 'string' ? new Date(value) : value);
}
