import { describe, expect, it } from 'vitest';
import { compareLog } from '../../../src/lib/logs/compare';
import { parseLogMapping, type LogMapping } from '../../../src/lib/logs/mapping';
import { GAP_FACTOR, MAX_LOG_ISSUES, readLog, type LogIssue, type LogSample } from '../../../src/lib/logs/read-log';
import { generatedRun, logText } from './generated-log';

// A located error names the line (header = line 1), the column by number and header name, what was
// expected and what was found: the convention of compilers and linters (common practice).

const run = generatedRun(40);
const { doc, mapping, header } = run;
const column = (name: string) => header.indexOf(name);

async function issuesOf(text: string, map: LogMapping = mapping): Promise<LogIssue[]> {
  const result = await compareLog(doc, map, text);
  if (result.ok) return [];
  return result.error.issues as LogIssue[];
}

/** The generated log's text with one line replaced (1-based, header = 1). */
function withLine(lineNumber: number, change: (fields: string[]) => string[]): string {
  const lines = logText(run).split('\n');
  lines[lineNumber - 1] = change(lines[lineNumber - 1]!.split(',')).join(',');
  return lines.join('\n');
}

describe('bad logs are located', () => {
  it('a column named in the mapping but missing from the header: line 1, naming the column and the mapping field', async () => {
    const text = logText(run).replace('north-roll.measured', 'north-roll.measurd');
    const [issue, ...rest] = await issuesOf(text);
    expect(rest).toEqual([]);
    expect(issue!.line).toBe(1);
    expect(issue!.message).toContain('"north-roll.measured"');
    expect(issue!.message).toContain('joints[2].measuredRate.column');
  });

  it('a column named twice in the header', async () => {
    const text = logText(run).replace('px,', 'qx,');
    const issues = await issuesOf(text);
    expect(issues.some((issue) => issue.line === 1 && issue.columnName === 'qx' && /more than once/.test(issue.found))).toBe(true);
  });

  it('a cell that is not a number: line, column number and name, expected and found', async () => {
    const text = withLine(7, (f) => { f[column('southwest-base.angle')] = 'n/a'; return f; });
    const [issue] = await issuesOf(text);
    expect(issue).toMatchObject({ line: 7, column: column('southwest-base.angle') + 1, columnName: 'southwest-base.angle', found: '"n/a"' });
    expect(issue!.expected).toMatch(/joint angle/);
    expect(issue!.message).toBe(`line 7, column ${column('southwest-base.angle') + 1} ("southwest-base.angle"): expected a joint angle (a decimal number), found "n/a"`);
  });

  it.each([
    ['an empty cell', '', 'an empty cell'],
    ['a hexadecimal number', '0x10', '"0x10"'],
    ['Infinity', 'Infinity', '"Infinity"'],
    ['NaN', 'NaN', '"NaN"'],
  ])('%s is refused, not read as a number', async (_, cell, found) => {
    const [issue] = await issuesOf(withLine(5, (f) => { f[column('py')] = cell; return f; }));
    expect(issue).toMatchObject({ line: 5, columnName: 'py', found });
  });

  it('a value beyond the physical limit of its kind (a position of 20 m)', async () => {
    const [issue] = await issuesOf(withLine(4, (f) => { f[column('pz')] = '20'; return f; }));
    expect(issue).toMatchObject({ line: 4, columnName: 'pz' });
    expect(issue!.expected).toMatch(/at most 10/);
  });

  it('a joint rate beyond the angular speed limit', async () => {
    const [issue] = await issuesOf(withLine(9, (f) => { f[column('north-roll.commanded')] = '1e5'; return f; }));
    expect(issue).toMatchObject({ line: 9, columnName: 'north-roll.commanded' });
  });

  it('a quaternion far from unit length', async () => {
    const [issue] = await issuesOf(withLine(6, (f) => { f[column('qw')] = '2'; return f; }));
    expect(issue).toMatchObject({ line: 6 });
    expect(issue!.expected).toMatch(/unit quaternion/);
  });

  it('a row with too few fields', async () => {
    const [issue] = await issuesOf(withLine(3, (f) => f.slice(0, -2)));
    expect(issue).toMatchObject({ line: 3, expected: `${header.length} fields as in the header`, found: `${header.length - 2}` });
  });

  it('a row out of time order', async () => {
    const [issue] = await issuesOf(withLine(10, (f) => { f[0] = '0.001'; return f; }));
    expect(issue).toMatchObject({ line: 10, columnName: 't' });
    expect(issue!.found).toMatch(/out of time order/);
  });

  it('a repeated timestamp', async () => {
    const lines = logText(run).split('\n');
    const previousTime = lines[10]!.split(',')[0]!;
    const [issue] = await issuesOf(withLine(12, (f) => { f[0] = previousTime; return f; }));
    expect(issue).toMatchObject({ line: 12, columnName: 't' });
    expect(issue!.found).toMatch(/repeated timestamp/);
  });

  it('several bad rows are all reported, up to the limit', async () => {
    const lines = logText(run).split('\n');
    const text = lines.map((line, i) => (i >= 1 && i <= 30 ? line.replace(/^[^,]*/, 'x') : line)).join('\n');
    const issues = await issuesOf(text);
    expect(issues.map((issue) => issue.line)).toEqual(Array.from({ length: 30 }, (_, i) => i + 2));
    expect(MAX_LOG_ISSUES).toBeGreaterThanOrEqual(30);
  });

  it('an empty log, a log with only a header, and a blank line where the header belongs', async () => {
    expect((await issuesOf(''))[0]!.expected).toMatch(/header/);
    expect(await issuesOf(`${header.join(',')}\n`)).toMatchObject([{ line: 2, expected: 'at least one sample after the header' }]);
    expect(await issuesOf(`\n${logText(run)}`)).toMatchObject([{ line: 1, expected: 'a header line naming the columns', found: 'an empty line' }]);
  });

  it('a mapping naming a joint the sheet does not have is an error naming the joint', async () => {
    const raw = JSON.parse(JSON.stringify((await import('../../../src/lib/logs/generate')).runLogMapping(doc, { rate: '0.05 rad/s', slip: '1 mm/s' })));
    raw.joints[4].joint = 'thumb-roll';
    const read = parseLogMapping(raw);
    expect(read.ok).toBe(true);
    if (!read.ok) return;
    const result = await compareLog(doc, read.mapping, logText(run));
    expect(result.ok).toBe(false);
    if (result.ok) return;
    expect(result.error.stage).toBe('mapping');
    expect(result.error.issues).toEqual([{ path: 'joints[4].joint', message: expect.stringContaining('no joint named "thumb-roll"') }]);
  });
});

describe('gaps in the time column', () => {
  // The rule: an interval longer than GAP_FACTOR (1.5) nominal periods is a gap; the nominal period is
  // time.period from the mapping, else the log's first interval.
  const gapText = () => logText(run, (row, tick) => { if (tick >= 20) row[0]! += 0.5; });

  it('reports a gap with the lines and times around it, and keeps comparing', async () => {
    const result = await compareLog(doc, mapping, gapText());
    expect(result.ok).toBe(true);
    if (!result.ok) return;
    expect(result.value.gapCount).toBe(1);
    const dt = doc.motion.run.dt;
    expect(result.value.gaps[0]!.line).toBe(22);
    expect(result.value.gaps[0]!.from).toBeCloseTo(19 * dt, 12);
    expect(result.value.gaps[0]!.to).toBeCloseTo(20 * dt + 0.5, 12);
    expect(result.value.samples).toBe(40);
  });

  it('does not differentiate across a gap: the samples beside it take one-sided differences', async () => {
    const samples: { time: number; afterGap: boolean }[] = [];
    await readLog(gapText(), mapping, { onSample: (s: LogSample) => samples.push({ time: s.time, afterGap: s.afterGap }) });
    expect(samples.filter((s) => s.afterGap).map((s) => samples.indexOf(s))).toEqual([0, 20]);
  });

  it('takes the nominal period from the mapping when given', async () => {
    const dt = doc.motion.run.dt;
    const raw = JSON.parse(JSON.stringify((await import('../../../src/lib/logs/generate')).runLogMapping(doc, { rate: '0.05 rad/s', slip: '1 mm/s' })));
    // With a stated period of dt / (GAP_FACTOR + 0.5) every interval of the log is a gap.
    raw.time.period = dt / (GAP_FACTOR + 0.5);
    const read = parseLogMapping(raw);
    if (!read.ok) throw new Error('mapping');
    const result = await compareLog(doc, read.mapping, logText(run));
    expect(result.ok && result.value.gapCount).toBe(39);
  });
});

describe('intervals too short to differentiate over', () => {
  it('a row less than MIN_LOG_INTERVAL after the one before is an error at its line', async () => {
    const { MIN_LOG_INTERVAL } = await import('../../../src/lib/logs/read-log');
    const lines = logText(run).split('\n');
    const before = Number(lines[7]!.split(',')[0]);
    const [issue] = await issuesOf(withLine(9, (f) => { f[0] = String(before + MIN_LOG_INTERVAL / 10); return f; }));
    expect(issue).toMatchObject({ line: 9, columnName: 't' });
    expect(issue!.expected).toMatch(/at least 0.000001 s after/);
  });
});
