/**
 * Numbers quoted in the prose of a worked example, computed by the core. An example writes
 * `<Num of="steer.rollRate" finger="left" unit="rad/s" />` where its text names a number; the page
 * collects every such marker from the example's source, computes them here (evaluate.ts for a
 * solve, runSheet for a run, compareLog for a controller log) and the marker prints the result. A
 * marker that no longer resolves (an unknown output, finger or variable, a warning the sheet stops
 * raising) throws, so an example whose sheet drifts fails its build and its unit test instead of
 * printing a stale number.
 */
import { ROTATION_METRICS, runSheet, WARNING_CATALOGUE, type PlainSheetResult, type RunRecord, type WarningCode } from '../kinematics';
import { runLogCsv, runLogMapping } from '../logs/generate';
import { compareLog, type LogComparison } from '../logs/compare';
import { parseLogMapping } from '../logs/mapping';
import { evaluateSheet, type SheetEvaluation } from '../sheet/evaluate';
import { formatShownNumber } from '../sheet/outputs';
import { unitFactor } from '../sheet/units';
import { readOutput } from './read-output';
import { withVariables } from './variables';

/**
 * A marker's attributes, all text as written in the example:
 * - `of`: an output address (read-output.ts: a catalogue id, contact.rollAxisDistance, ...), a JSON pointer into the solved SI document
 *   (`/object/shape/radius`, with `si` naming its SI unit), `run.ticks`, `run.time`,
 *   `run.positionError`, `run.orientationError` (part: a metric key, default phi6), `warning.value`
 *   or `warning.threshold` (part: the warning code), or `log.maxResidual`, `log.rmsResidual`,
 *   `log.withinShare` (per cent; part: the joint name), `log.samples`, `log.rateTolerance` and
 *   `log.slipTolerance` for the example's controller log;
 * - `sheet`: which of the example's sheets (its file name without .json; the first when absent);
 * - `finger`: the finger's name, for finger and joint outputs and warnings;
 * - `part`: a joint name, x, y or z, or a 0-based index, for outputs with several values;
 * - `set`: variable values for this number, `name = value; name = value`;
 * - `si`: the SI unit of a pointer's number, or of an output the catalogue lists without a unit;
 * - `unit`: the unit to print (converted by mathjs); the output's display unit when absent;
 * - `digits`: significant digits (3 when absent); `bare`: print the number without its unit.
 */
export interface QuoteSpec {
  of: string;
  sheet?: string;
  finger?: string;
  part?: string;
  set?: string;
  si?: string;
  unit?: string;
  digits?: string;
  bare?: string;
}

export interface Quote {
  /** The value in the printed unit (a number), or text (a contact state, a stop reason). */
  value: number | string;
  /** As printed, unit included unless the marker is bare. */
  text: string;
}

/** The sheets of an example by name (file name without .json), as written, the first the example's own. */
export type ExampleSheets = ReadonlyMap<string, unknown>;

/** A controller log an example checks: the sheet the controller really ran (a variant of the example's sheet) and the mapping's tolerances. */
export interface ExampleLog {
  /** Variable values of the controller's build, e.g. "rollerRadius = 11 mm". */
  controller: string;
  tolerances: { rate: string; slip: string };
}

const QUOTE_ATTRIBUTES: readonly (keyof QuoteSpec)[] = ['of', 'sheet', 'finger', 'part', 'set', 'si', 'unit', 'digits', 'bare'];

/** The one key of a marker, the same from its props at render time and from its source text. */
export function quoteKey(spec: Readonly<Partial<Record<keyof QuoteSpec, unknown>>>): string {
  return JSON.stringify(QUOTE_ATTRIBUTES.filter((k) => spec[k] !== undefined).map((k) => [k, String(spec[k])]));
}

/** Every `<Num ... />` marker of an example's MDX source, with its attributes (double-quoted text only). */
export function collectQuoteSpecs(source: string): QuoteSpec[] {
  const specs: QuoteSpec[] = [];
  for (const tag of source.matchAll(/<Num\b([^>]*?)\/>/g)) {
    const attributes: Record<string, string> = {};
    for (const [, name, value] of tag[1]!.matchAll(/(\w+)="([^"]*)"/g)) attributes[name!] = value!;
    if (attributes.of === undefined) throw new Error(`a <Num> marker without "of": ${tag[0]}`);
    specs.push(attributes as unknown as QuoteSpec);
  }
  return specs;
}

/** `name = value; name = value` read into variable values. */
export function readSetting(set: string | undefined): Record<string, string> {
  const values: Record<string, string> = {};
  for (const item of (set ?? '').split(';')) {
    const equals = item.indexOf('=');
    if (equals > 0) values[item.slice(0, equals).trim()] = item.slice(equals + 1).trim();
  }
  return values;
}

/** Below this magnitude (SI) a number is the solver's rounding, not a value: the prose says 0 rather than 3e-16. */
const ROUNDING_FLOOR = 1e-12;

function format(computedSI: number, siUnit: string, spec: QuoteSpec, fallbackUnit = siUnit): Quote {
  const unit = spec.unit ?? fallbackUnit;
  const valueSI = Math.abs(computedSI) < ROUNDING_FLOOR ? 0 : computedSI;
  const value = siUnit === unit || siUnit === '' || siUnit === '1' ? valueSI : valueSI * unitFactor(siUnit, unit);
  if (!Number.isFinite(value)) throw new Error(`quote ${quoteKey(spec)} is not a finite number (${value})`);
  const number = formatShownNumber(value, spec.digits === undefined ? 3 : Number(spec.digits));
  const shown = unit === '' || unit === '1' || spec.bare !== undefined ? number : `${number} ${unit}`;
  return { value, text: shown };
}

function pointerValue(root: unknown, pointer: string): unknown {
  return pointer
    .slice(1)
    .split('/')
    .reduce<unknown>((node, token) => (node !== null && typeof node === 'object' ? (node as Record<string, unknown>)[token] : undefined), root);
}

/** Computes the quotes of one example, solving each sheet variant and running each run once. */
export class QuoteBook {
  private readonly evaluations = new Map<string, SheetEvaluation>();
  private readonly runs = new Map<string, RunRecord>();
  private comparison: LogComparison | undefined;

  constructor(
    private readonly sheets: ExampleSheets,
    private readonly log?: ExampleLog,
  ) {}

  private document(spec: QuoteSpec, set = spec.set): { key: string; document: unknown } {
    const name = spec.sheet ?? [...this.sheets.keys()][0];
    const document = name === undefined ? undefined : this.sheets.get(name);
    if (document === undefined) throw new Error(`quote ${quoteKey(spec)}: the example has no sheet "${name}"`);
    return { key: `${name}|${set ?? ''}`, document: withVariables(document, readSetting(set)) };
  }

  /** The solved sheet a marker reads (its variant with `set` applied). */
  evaluation(spec: QuoteSpec, set = spec.set): SheetEvaluation {
    const { key, document } = this.document(spec, set);
    let evaluation = this.evaluations.get(key);
    if (!evaluation) {
      const evaluated = evaluateSheet(document);
      if (!evaluated.ok) throw new Error(`quote ${quoteKey(spec)}: the sheet does not solve: ${evaluated.error.message}`);
      evaluation = evaluated.value;
      this.evaluations.set(key, evaluation);
    }
    return evaluation;
  }

  private run(spec: QuoteSpec): RunRecord {
    const { key } = this.document(spec);
    let record = this.runs.get(key);
    if (!record) {
      record = runSheet(this.evaluation(spec).doc);
      this.runs.set(key, record);
    }
    return record;
  }

  private fingerIndex(result: PlainSheetResult, spec: QuoteSpec): number {
    const index = result.fingers.findIndex((f) => f.name === spec.finger);
    if (index < 0) throw new Error(`quote ${quoteKey(spec)}: no finger "${spec.finger}"`);
    return index;
  }

  /** Compares the example's controller log (a run of the controller's build, written as a log) with the example's own sheet. */
  async prepareLog(): Promise<void> {
    if (!this.log || this.comparison) return;
    const sheet: QuoteSpec = { of: 'log' };
    const controller = this.evaluation(sheet, this.log.controller).doc;
    const csv = runLogCsv(controller, runSheet(controller));
    const mapping = parseLogMapping(runLogMapping(controller, this.log.tolerances));
    if (!mapping.ok) throw new Error(`the example's log mapping does not read: ${mapping.issues[0]?.message}`);
    const compared = await compareLog(this.evaluation(sheet).doc, mapping.mapping, csv);
    if (!compared.ok) throw new Error(`the example's log does not compare: ${compared.error.message}`);
    this.comparison = compared.value;
  }

  private logQuote(spec: QuoteSpec): Quote {
    if (!this.comparison) throw new Error(`quote ${quoteKey(spec)}: the example has no controller log (or prepareLog was not awaited)`);
    if (spec.of === 'log.samples') return format(this.comparison.samples, '', spec);
    if (spec.of === 'log.rateTolerance') return format(this.comparison.tolerances.rate, 'rad/s', spec);
    if (spec.of === 'log.slipTolerance') return format(this.comparison.tolerances.slip, 'm/s', spec, 'mm/s');
    const joint = this.comparison.joints.find((j) => j.joint === spec.part);
    if (!joint) throw new Error(`quote ${quoteKey(spec)}: the log compares no joint "${spec.part}"`);
    if (spec.of === 'log.maxResidual') return format(joint.max, 'rad/s', spec);
    if (spec.of === 'log.rmsResidual') return format(joint.rms, 'rad/s', spec);
    if (spec.of === 'log.withinShare') return format(joint.withinFraction * 100, '', spec);
    throw new Error(`quote ${quoteKey(spec)}: unknown log quantity`);
  }

  private runQuote(spec: QuoteSpec): Quote {
    const record = this.run(spec);
    const last = record.tickCount - 1;
    switch (spec.of) {
      case 'run.ticks':
        return format(record.tickCount, '', spec);
      case 'run.time':
        return format(record.tickCount * record.settings.dt, 's', spec);
      case 'run.positionError':
        return format(record.positionError[last]!, 'm', spec, 'mm');
      case 'run.orientationError': {
        const metric = ROTATION_METRICS.findIndex((m) => m.key === (spec.part ?? 'phi6'));
        if (metric < 0) throw new Error(`quote ${quoteKey(spec)}: no rotation metric "${spec.part}"`);
        const unit = ROTATION_METRICS[metric]!.unit;
        return format(record.orientationError[ROTATION_METRICS.length * last + metric]!, unit, spec, unit === 'rad' ? 'deg' : unit);
      }
      default:
        throw new Error(`quote ${quoteKey(spec)}: unknown run quantity`);
    }
  }

  private warningQuote(spec: QuoteSpec, result: PlainSheetResult): Quote {
    const code = spec.part as WarningCode;
    const info = WARNING_CATALOGUE[code];
    if (!info) throw new Error(`quote ${quoteKey(spec)}: no warning code "${spec.part}"`);
    const finger = spec.finger === undefined ? undefined : this.fingerIndex(result, spec);
    const warning = result.warnings.find((w) => w.code === code && (finger === undefined || w.finger === finger));
    if (!warning) throw new Error(`quote ${quoteKey(spec)}: the sheet does not raise ${code}${spec.finger ? ` on finger "${spec.finger}"` : ''}`);
    const si = info.unit === '1' ? '' : info.unit;
    return format(spec.of === 'warning.value' ? warning.value : warning.threshold, si, spec, si === 'm' ? 'mm' : si);
  }

  /** The quote of one marker; throws when the marker no longer resolves. */
  quote(spec: QuoteSpec): Quote {
    if (spec.of.startsWith('log.')) return this.logQuote(spec);
    if (spec.of.startsWith('run.')) return this.runQuote(spec);
    const { doc, result } = this.evaluation(spec);
    if (spec.of.startsWith('warning.')) return this.warningQuote(spec, result);
    if (spec.of.startsWith('/')) {
      const value = pointerValue(doc, spec.of);
      if (typeof value !== 'number') throw new Error(`quote ${quoteKey(spec)}: the sheet has no number at ${spec.of}`);
      return format(value, spec.si ?? '', spec);
    }
    const read = readOutput(result, spec);
    if (typeof read.value === 'string') return { value: read.value, text: read.value };
    // An output without a unit of its own (a grasp map singular value is 1 or m by direction) takes the marker's `si`.
    return read.unit === '' && spec.si ? format(read.value, spec.si, spec) : format(read.value, read.unit, spec, read.shownUnit);
  }
}

/** Every quote of an example's source by its key (see quoteKey), computed by the core. */
export async function computeQuotes(source: string, sheets: ExampleSheets, log?: ExampleLog): Promise<Map<string, Quote>> {
  const book = new QuoteBook(sheets, log);
  const specs = collectQuoteSpecs(source);
  if (specs.some((s) => s.of.startsWith('log.'))) await book.prepareLog();
  return new Map(specs.map((spec) => [quoteKey(spec), book.quote(spec)]));
}

const COMPUTED = new Map<string, Promise<Map<string, Quote>>>();

/** The quotes of the example `id`, computed once per process: an example's source and sheets are part of the build. */
export function exampleQuotes(id: string, source: string, sheets: ExampleSheets, log?: ExampleLog): Promise<Map<string, Quote>> {
  let quotes = COMPUTED.get(id);
  if (!quotes) {
    quotes = computeQuotes(source, sheets, log);
    COMPUTED.set(id, quotes);
  }
  return quotes;
}
