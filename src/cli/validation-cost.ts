/**
 * How long the server's validation and summary of the largest valid sheet takes, the time for
 * which one save or import holds the event loop when run on it.
 * Usage: npx tsx src/cli/validation-cost.ts [rounds]
 */
import { readFileSync } from 'node:fs';
import { evaluateSheet } from '../lib/sheet/evaluate';
import { largestSheet } from '../lib/sheet/largest-sheet';

const rounds = Number(process.argv[2] ?? 10);
const document = largestSheet(JSON.parse(readFileSync('content/sheets/line4-peg-tilt.json', 'utf8')));
const first = evaluateSheet(document);
if (!first.ok) throw new Error(`the largest sheet does not validate: ${first.error.issues[0].path}: ${first.error.issues[0].message}`);
const times: number[] = [];
// CPU time as well as wall time: on a shared machine the wall time also counts other processes' turns.
const cpuTimes: number[] = [];
for (let round = 0; round < rounds; round++) {
  // A copy with fresh texts each round, so the expression cache does not make later rounds cheap.
  const fresh = JSON.parse(JSON.stringify(document).replaceAll('e-300', `e-${300 - round - 1}`));
  const cpu = process.cpuUsage();
  const start = performance.now();
  evaluateSheet(fresh);
  times.push(performance.now() - start);
  const used = process.cpuUsage(cpu);
  cpuTimes.push((used.user + used.system) / 1000);
}
const median = (values: number[]) => values.sort((a, b) => a - b)[Math.floor(values.length / 2)];
console.log(JSON.stringify({ bytes: JSON.stringify(document).length, rounds, wallMedianMs: median(times), wallMaxMs: times.at(-1), cpuMedianMs: median(cpuTimes), cpuMaxMs: cpuTimes.at(-1) }));
