import { createRandom, nextGaussian, runSheet } from '../kinematics';
import { runLogHeader, runLogMapping, runLogRow } from '../logs/generate';
import type { Role } from '../roles';
import type { SheetDocument } from '../sheet/types';

/** The invented demo team seeded into an empty database. Demo only: never use these sign-ins elsewhere. */
export const DEMO_TEAM = { slug: 'tarnwhistle-cell4', name: 'Tarnwhistle Grip Works · Cell 4' } as const;

export const DEMO_PASSWORD = 'slipless-demo';

export const DEMO_USERS: readonly { name: string; email: string; role: Role }[] = [
  { name: 'Priya Okafor', email: 'owner@tarnwhistle.example', role: 'owner' },
  { name: 'Tomas Lindqvist', email: 'editor@tarnwhistle.example', role: 'editor' },
  { name: 'Mei Arroyo', email: 'reviewer@tarnwhistle.example', role: 'reviewer' },
  { name: 'Jonah Bakker', email: 'viewer@tarnwhistle.example', role: 'viewer' },
];

export const DEMO_SHEETS_FOLDER = 'content/sheets';

/** An injected fault of a demo controller log: from `from` to `to` (s, inclusive), `amount` added to one logged column. */
export interface DemoLogFault {
  column: string;
  from: number;
  to: number;
  /** Added to the logged value, in the column's unit (rad/s for rates). */
  amount: number;
}

/**
 * A demo controller log: written from a demo sheet's own run (the rates the sheet commands, as a
 * controller following it exactly would log them) with seeded Gaussian noise on every logged
 * joint rate, plus the stated faults.
 */
export interface DemoLog {
  sheetFile: string;
  fileName: string;
  gzip: boolean;
  description: string;
  ticks: number;
  noiseSeed: number;
  /** Standard deviation of the noise on logged joint rates, rad/s: an encoder-derived rate at 200 Hz is this noisy. */
  rateNoise: number;
  faults: DemoLogFault[];
  /** The mapping JSON shipped in DEMO_LOG_MAPPINGS_FOLDER. */
  mappingFile: string;
}

/** Where the demo logs' mapping files ship; kept apart from the sheets, which every example-sheet check reads. */
export const DEMO_LOG_MAPPINGS_FOLDER = 'content/log-mappings';

/** Tolerances the demo team judges its controller logs by. */
export const DEMO_LOG_TOLERANCES = { rate: '0.05 rad/s', slip: '1 mm/s' } as const;

export const DEMO_LOGS: readonly DemoLog[] = [
  {
    sheetFile: 'line4-peg-tilt.json',
    fileName: 'cell4-peg-tilt-run-0412.csv',
    gzip: false,
    description: 'Peg tilt in cell 4: the controller followed the sheet; rate noise only (0.004 rad/s RMS).',
    ticks: 400,
    noiseSeed: 412,
    rateNoise: 0.004,
    faults: [],
    mappingFile: 'line4-peg-tilt.log-mapping.json',
  },
  {
    sheetFile: 'line4-bearing-housing-quarter-turn.json',
    fileName: 'cell4-bearing-housing-run-0419.csv.gz',
    gzip: true,
    description:
      'Bearing housing quarter turn: from 0.5 s to 0.745 s the north roller slips (its measured roll rate 3 rad/s above what the motion needs); ' +
      'from 1.25 s to 1.495 s the north pivot is commanded 0.2 rad/s too fast.',
    ticks: 400,
    noiseSeed: 419,
    rateNoise: 0.004,
    faults: [
      { column: 'north-roll.measured', from: 0.5, to: 0.745, amount: 3 },
      { column: 'north-pivot.commanded', from: 1.25, to: 1.495, amount: 0.2 },
    ],
    mappingFile: 'line4-bearing-housing.log-mapping.json',
  },
];

/** The demo log's CSV text: the sheet's run, noise on every logged rate (rad/s), then the faults at their times (s). */
export function demoLogText(doc: SheetDocument, log: DemoLog): string {
  // Run the whole stated length even where the sheet would stop at its target, so the log covers every fault.
  const record = runSheet(doc, { settings: { ...doc.motion.run, maxTicks: log.ticks, positionTolerance: -1, angleTolerance: -1, stopOnSingular: false } });
  const header = runLogHeader(doc);
  const noisy = header.map((name) => name.endsWith('.commanded') || name.endsWith('.measured'));
  const faults = log.faults.map((fault) => {
    const column = header.indexOf(fault.column);
    if (column < 0) throw new Error(`Demo log ${log.fileName} names the column ${fault.column}, which the sheet's log does not have.`);
    return { ...fault, column };
  });
  const random = createRandom(log.noiseSeed);
  const lines = [header.join(',')];
  for (let tick = 0; tick < record.tickCount; tick++) {
    const row = runLogRow(record, tick);
    const time = row[0]!;
    row.forEach((value, i) => {
      if (noisy[i]) row[i] = value + log.rateNoise * nextGaussian(random);
    });
    // Half a tick of slack: times are sums of dt and carry rounding.
    const slack = doc.motion.run.dt / 2;
    for (const fault of faults) if (time >= fault.from - slack && time <= fault.to + slack) row[fault.column]! += fault.amount;
    lines.push(row.join(','));
  }
  return `${lines.join('\n')}\n`;
}

/** The mapping JSON of a demo log (every joint's angle, commanded and measured rate), as shipped in DEMO_LOG_MAPPINGS_FOLDER. */
export function demoLogMapping(doc: SheetDocument) {
  return runLogMapping(doc, { ...DEMO_LOG_TOLERANCES });
}
