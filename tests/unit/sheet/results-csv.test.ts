import { describe, expect, it } from 'vitest';
import { compareLog } from '../../../src/lib/logs/compare';
import { comparedSampleHeader, csvTable } from '../../../src/lib/sheet/results-csv';
import { generatedRun, logText } from '../logs/generated-log';

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

describe('comparedSampleHeader names the solution the sheet rates come from', () => {
  const run = generatedRun(20);

  /** The header a comparison of the generated log writes under the sheet's choice. */
  async function headerUnder(commanded: 'steer-and-roll' | 'full'): Promise<string[]> {
    let header = '';
    const outcome = await compareLog({ ...run.doc, commanded }, run.mapping, logText(run), { onColumns: (columns) => (header = comparedSampleHeader(columns)) });
    expect(outcome.ok).toBe(true);
    return header.trimEnd().split(',');
  }

  it('names steer-and-roll for a finger with base, pivot and roll joints, and the full solution when the sheet chooses it', async () => {
    const finger = run.doc.hand.fingers[0]!;
    // Steer-and-roll applies to a finger with a base, a pivot and a roll joint (the sheet format's rule for the commanded solution).
    expect(finger.joints.map((j) => j.role)).toEqual(expect.arrayContaining(['base', 'pivot', 'roll']));
    const joint = finger.joints[0]!.name;
    const steer = await headerUnder('steer-and-roll');
    expect(steer).toContain(`${joint}.sheet_steer_and_roll_rad_s`);
    expect(steer.some((column) => column.endsWith('.sheet_rad_s'))).toBe(false);
    const full = await headerUnder('full');
    expect(full).toContain(`${joint}.sheet_full_rad_s`);
    expect(full.some((column) => column.includes('steer_and_roll'))).toBe(false);
  });
});
