import { describe, expect, it } from 'vitest';
import { revisionLabel } from '../../../src/lib/view/revision';
import { formatDateTime } from '../../../src/lib/view/when';

describe('formatDateTime', () => {
  const moment = new Date(Date.UTC(2026, 11, 3, 14, 5, 9));

  it('names the zone the time is read in', () => {
    expect(formatDateTime(moment, 'UTC')).toBe('3 Dec 2026, 14:05 UTC');
    expect(formatDateTime(moment.toISOString(), 'UTC', true)).toBe('3 Dec 2026, 14:05:09 UTC');
  });

  it('reads the same moment in another zone with that zone named (IANA tz database: Berlin keeps UTC+1 in December, Tokyo UTC+9)', () => {
    expect(formatDateTime(moment, 'Europe/Berlin')).toMatch(/^3 Dec 2026, 15:05 (CET|GMT\+1)$/);
    expect(formatDateTime(moment, 'Asia/Tokyo')).toMatch(/^3 Dec 2026, 23:05 (JST|GMT\+9)$/);
  });
});

describe('revisionLabel', () => {
  it('writes every revision number one way', () => {
    expect(revisionLabel(3)).toBe('rev 3');
  });
});
