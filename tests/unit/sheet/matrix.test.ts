import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { quat, runSheet, warningsAt } from '../../../src/lib/kinematics';
import { geodesicAngle } from '../../../src/lib/kinematics/metrics';
import { groupStatistics, matrixCases, metricThreshold, runMatrix, type MatrixRun } from '../../../src/lib/sheet/matrix';
import { parseSheet } from '../../../src/lib/sheet/schema';
import type { SheetDocument } from '../../../src/lib/sheet/types';

const pegText = readFileSync(new URL('../../../content/sheets/line4-peg-tilt.json', import.meta.url), 'utf8');

function sheetWith(matrix: unknown, run: Record<string, unknown> = {}): SheetDocument {
  const raw = JSON.parse(pegText);
  raw.matrix = matrix;
  raw.motion.run = { ...raw.motion.run, ...run };
  const parsed = parseSheet(raw);
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.issues));
  return parsed.doc;
}

describe('matrix in the sheet document', () => {
  it('reads targets as axis-angle or quaternion, fills the metric (phi6) and leaves starts and generators empty', () => {
    const doc = sheetWith({ targets: [{ orientation: { axis: [0, 0, 1], angle: '90 deg' }, group: 'vertical' }, { orientation: { w: 0, x: 1, y: 0, z: 0 } }] });
    expect(doc.matrix?.metric).toBe('phi6');
    expect(doc.matrix?.starts).toEqual([]);
    // Axis-angle to quaternion: q = (cos(a/2), sin(a/2) axis) (Shoemake 1985, common practice).
    expect(doc.matrix?.targets[0]!.orientation).toEqual({ w: Math.cos(Math.PI / 4), x: 0, y: 0, z: Math.sin(Math.PI / 4) });
    expect(doc.matrix?.targets[0]!.group).toBe('vertical');
  });

  it('refuses a non-unit target quaternion, an empty matrix and too many generated targets, naming the field', () => {
    const read = (matrix: unknown) => {
      const raw = JSON.parse(pegText);
      raw.matrix = matrix;
      const parsed = parseSheet(raw);
      return parsed.ok ? [] : parsed.issues.map((issue) => issue.path);
    };
    expect(read({ targets: [{ orientation: { w: 1, x: 1, y: 0, z: 0 } }] })).toEqual(['matrix.targets[0].orientation']);
    expect(read({})).toEqual(['matrix.targets']);
    expect(read({ generators: [{ kind: 'random', count: 400, seed: 1 }, { kind: 'spread-axes', count: 200, angle: 1 }] })).toEqual(['matrix.generators']);
    expect(read({ targets: [{ orientation: { w: 1, x: 0, y: 0, z: 0 } }], metric: 'phi1' })).toEqual(['matrix.metric']);
    expect(read({ generators: [{ kind: 'spread-axes', count: 0, angle: 1 }] })).toEqual(['matrix.generators[0].count']);
  });
});

describe('matrixCases', () => {
  it('runs every target from every start, each target the rotation applied to its start (geodesic distance is bi-invariant: Huynh 2009, Phi6)', () => {
    const doc = sheetWith({
      targets: [{ orientation: { axis: [1, 0, 0], angle: '30 deg' } }],
      starts: [{ orientation: { w: 1, x: 0, y: 0, z: 0 } }, { orientation: { axis: [0, 1, 0], angle: '20 deg' }, label: 'tipped' }],
      generators: [{ kind: 'spread-axes', count: 3, angle: '50 deg', group: 'spread' }],
    });
    const cases = matrixCases(doc, doc.matrix!);
    expect(cases.length).toBe(4 * 2);
    expect(cases.map((c) => c.startLabel)).toEqual(['start 1', 'tipped', 'start 1', 'tipped', 'start 1', 'tipped', 'start 1', 'tipped']);
    expect(cases.map((c) => c.group)).toEqual(['targets', 'targets', 'spread', 'spread', 'spread', 'spread', 'spread', 'spread']);
    const angles = cases.map((c) => geodesicAngle(quat.fromSheet(c.startOrientation), quat.fromSheet(c.targetOrientation)));
    expect(angles).toBeNear([30, 30, 50, 50, 50, 50, 50, 50].map((d) => (d * Math.PI) / 180), { abs: 1e-12 });
  });
});

describe('metricThreshold', () => {
  it('writes an angle tolerance t in each metric by Huynh (2009) relations: 2 sin(t/4), t/2, 1 - cos(t/2), 2 sqrt2 sin(t/2), t', () => {
    const t = 0.3;
    expect(['phi2', 'phi3', 'phi4', 'phi5', 'phi6'].map((m) => metricThreshold(m as 'phi2', t))).toBeNear(
      [2 * Math.sin(t / 4), t / 2, 1 - Math.cos(t / 2), 2 * Math.SQRT2 * Math.sin(t / 2), t],
      { abs: 1e-14 },
    );
  });
});

describe('groupStatistics', () => {
  it('gives mean 5 and sample standard deviation sqrt(32/7) of 2, 4, 4, 4, 5, 5, 7, 9 (the textbook example whose population sd is 2)', () => {
    const runs = [2, 4, 4, 4, 5, 5, 7, 9].map((value, i) => ({ group: i < 8 ? 'a' : 'b', outcome: 'converged', finalError: value, ticks: value, time: value / 10 }) as MatrixRun);
    const [group] = groupStatistics(runs);
    expect(group!.finalError.mean).toBeNear(5, { abs: 1e-14 });
    expect(group!.finalError.sd).toBeNear(Math.sqrt(32 / 7), { abs: 1e-14 });
    expect(group!.time.sd).toBeNear(Math.sqrt(32 / 7) / 10, { abs: 1e-14 });
  });

  it('keeps groups apart, counts only converged runs in ticks and time, and has no sd for one value', () => {
    const runs = [
      { group: 'a', outcome: 'converged', finalError: 1, ticks: 10, time: 1 },
      { group: 'b', outcome: 'tick-limit', finalError: 3, ticks: 50, time: 5 },
      { group: 'b', outcome: 'converged', finalError: 1, ticks: 20, time: 2 },
      { group: 'b', outcome: 'refused', finalError: null, ticks: 0, time: 0 },
    ] as MatrixRun[];
    const groups = groupStatistics(runs);
    expect(groups.map((g) => [g.group, g.runs, g.converged])).toEqual([['a', 1, 1], ['b', 3, 1]]);
    expect(groups[0]!.finalError).toEqual({ mean: 1, sd: null });
    expect(groups[1]!.finalError.mean).toBe(2);
    expect(groups[1]!.finalError.sd).toBeNear(Math.SQRT2, { abs: 1e-14 });
    expect(groups[1]!.ticks).toEqual({ mean: 20, sd: null });
  });
});

describe('runMatrix', () => {
  it('ends each run as the plain run toward the same target does, and a converged run at or below the threshold', () => {
    const doc = sheetWith({ targets: [{ orientation: { axis: [1, 0, 0], angle: '20 deg' } }, { orientation: { axis: [0, 0, 1], angle: '10 deg' } }], metric: 'phi3' });
    const result = runMatrix(doc);
    expect(result.complete).toBe(true);
    expect(result.runs.length).toBe(2);
    for (const run of result.runs) {
      const single = structuredClone(doc);
      single.motion.target.orientation = run.targetOrientation;
      const record = runSheet(single);
      expect([run.outcome, run.ticks]).toEqual([record.stopReason, record.tickCount]);
      // phi3 is the half angle (Huynh 2009), so the record's geodesic column halved is the same number.
      expect(run.finalError).toBeNear(record.orientationError[5 * (record.tickCount - 1) + 4]! / 2, { abs: 1e-15 });
      if (run.outcome === 'converged') expect(run.finalError!).toBeLessThanOrEqual(result.threshold);
    }
    expect(result.runs.some((r) => r.outcome === 'converged')).toBe(true);
  });

  it('fails a run that reaches the tick limit and reports the warnings of every tick', () => {
    const doc = sheetWith({ targets: [{ orientation: { axis: [1, 0, 0], angle: '20 deg' } }] }, { maxTicks: 5 });
    const [run] = runMatrix(doc).runs;
    expect(run!.outcome).toBe('tick-limit');
    expect(run!.ticks).toBe(5);
    expect(run!.time).toBeNear(5 * doc.motion.run.dt, { abs: 1e-15 });
    const record = runSheet({ ...doc, motion: { ...doc.motion, target: { ...doc.motion.target, orientation: run!.targetOrientation } } });
    const codes = new Set(Array.from({ length: 5 }, (_, k) => warningsAt(record, k)).flat());
    expect(new Set(run!.warnings)).toEqual(codes);
  });

  it('stops when asked, keeping the finished runs and marking the result incomplete', () => {
    const doc = sheetWith({ generators: [{ kind: 'random', count: 4, seed: 2 }] });
    let finished = 0;
    const result = runMatrix(doc, doc.matrix, { onProgress: (done) => (finished = done), shouldStop: () => finished >= 1 });
    expect(result.complete).toBe(false);
    expect(result.runs.length).toBe(1);
    expect(result.totalRuns).toBe(4);
  });
});
