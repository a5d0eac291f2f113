import { describe, expect, it } from 'vitest';
import { csvTable } from '../../../src/lib/sheet/results-csv';

// Neutralising cells that a spreadsheet would run as a formula follows the OWASP "CSV Injection"
// guidance: text that starts with = + - @ tab or carriage return gets a leading single quote.

describe('csvTable', () => {
  it('prefixes text cells that a spreadsheet would read as a formula with a single quote', () => {
    const names = ['=HYPERLINK("http://evil.example","x")', '+1+1', '-2+3', '@SUM(A1)', '\tindex', '\rthumb'];
    const csv = csvTable(['finger'], names.map((name) => [name]));
    expect(csv.split('\n').slice(1, 5)).toEqual([`"'=HYPERLINK(""http://evil.example"",""x"")"`, "'+1+1", "'-2+3", "'@SUM(A1)"]);
    expect(csv).toContain("'\tindex");
    expect(csv).toContain("\"'\rthumb\"");
  });

  it('keeps numbers as numbers, negative ones and infinities included, and leaves ordinary text alone', () => {
    expect(csvTable(['a', 'b', 'c', 'd', 'e'], [[-0.25, -1e-9, -Infinity, 'index, left', 'rolling']])).toBe(
      'a,b,c,d,e\n-0.25,-1e-9,-Infinity,"index, left",rolling',
    );
  });
});
