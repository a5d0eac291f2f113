/**
 * Physical quantities at the edges of the product. Sheet documents may write a quantity as a
 * plain number (already SI: m, rad, s, m/s, rad/s, 1/s), as a string with a unit ("12 mm",
 * "30 deg", "0.5 rad/s", "20 mm/s"), or as an expression with units over the sheet's variables
 * ("rollerRadius + 2 mm", "2*pi rad/s"). Everything inside the core is SI.
 */
import {
  absDependencies, acosDependencies, addDependencies, asinDependencies, atan2Dependencies, atanDependencies, cosDependencies,
  create, createUnitDependencies, eDependencies, evaluateDependencies, hypotDependencies, isUnit,
  multiplyDependencies, divideDependencies, parseDependencies, piDependencies, powDependencies, sinDependencies, sqrtDependencies,
  subtractDependencies, tanDependencies, tauDependencies, unaryMinusDependencies, unaryPlusDependencies, unitDependencies,
  type EvalFunction, type MathNode, type Unit,
} from 'mathjs';

/**
 * A private mathjs instance so that the extra units below never leak into other users of mathjs;
 * built from the few functions that expressions need so that browsers load only those.
 */
const math = create({
  unitDependencies, createUnitDependencies, evaluateDependencies, parseDependencies,
  addDependencies, subtractDependencies, multiplyDependencies, divideDependencies, powDependencies,
  unaryMinusDependencies, unaryPlusDependencies, piDependencies, eDependencies, tauDependencies,
  sqrtDependencies, absDependencies, hypotDependencies,
  sinDependencies, cosDependencies, tanDependencies, asinDependencies, acosDependencies, atanDependencies, atan2Dependencies,
});
// min and max are left out on purpose: "min" must stay the unit minute.
// Motor data sheets give speeds in revolutions per minute; 1 rpm = 2 pi rad / 60 s.
math.createUnit('rpm', `${(2 * Math.PI) / 60} rad/s`);

export type QuantityKind = 'length' | 'angle' | 'time' | 'speed' | 'angularSpeed' | 'rate' | 'any';

/** A quantity as written in a sheet document: a number in SI units or a string with a unit. */
export type QuantityInput = number | string;

export type QuantityResult = { ok: true; value: number } | { ok: false; message: string };

interface KindInfo {
  /** SI unit in which plain numbers are read and in which the core works. */
  si: string;
  /** Noun used in messages ("expected a length"). */
  noun: string;
  /** Example of a unit string for messages. */
  example: string;
}

export const QUANTITY_KINDS: Record<Exclude<QuantityKind, 'any'>, KindInfo> = {
  length: { si: 'm', noun: 'a length', example: '12 mm' },
  angle: { si: 'rad', noun: 'an angle', example: '30 deg' },
  time: { si: 's', noun: 'a time', example: '5 ms' },
  speed: { si: 'm/s', noun: 'a speed', example: '20 mm/s' },
  angularSpeed: { si: 'rad/s', noun: 'an angular speed', example: '0.5 rad/s' },
  rate: { si: 's^-1', noun: 'a rate', example: '2 /s' },
};

const referenceUnits = new Map<string, Unit>(
  Object.entries(QUANTITY_KINDS).map(([kind, info]) => [kind, math.unit(info.si)]),
);

function nounOf(kind: QuantityKind): string {
  return kind === 'any' ? 'a quantity' : QUANTITY_KINDS[kind].noun;
}

/** A variable's value: a quantity with a unit, or a plain number for ratios and counts. */
export type VariableValue = Unit | number;

/** Named values that quantity expressions may use, e.g. rollerRadius -> 14 mm. */
export type VariableScope = ReadonlyMap<string, VariableValue>;

const compiled = new Map<string, { node: MathNode; code: EvalFunction } | { error: string; column?: number }>();
const COMPILED_CACHE_SIZE = 4000;

const ASSIGNMENT_NODES = new Set(['AssignmentNode', 'FunctionAssignmentNode', 'BlockNode']);

/** Parses and compiles an expression once; the sheet is read again on every keystroke, so this is cached. */
function compileExpression(text: string) {
  let entry = compiled.get(text);
  if (entry) return entry;
  try {
    const node = math.parse(text);
    const forbidden = node.filter((inner) => ASSIGNMENT_NODES.has(inner.type));
    entry = forbidden.length > 0 ? { error: 'a field takes a value, not an assignment or a list of statements' } : { node, code: node.compile() };
  } catch (error) {
    // mathjs reports the 1-based position at which it gave up.
    const column = (error as { char?: number }).char;
    entry = { error: readableMathError(error), ...(typeof column === 'number' ? { column } : {}) };
  }
  if (compiled.size >= COMPILED_CACHE_SIZE) compiled.clear();
  compiled.set(text, entry);
  return entry;
}

/** mathjs messages in the product's words ("Undefined symbol foo" names an unknown unit or variable). */
function readableMathError(error: unknown): string {
  const text = error instanceof Error ? error.message : String(error);
  const undefinedSymbol = /^Undefined symbol (\S+)/.exec(text);
  if (undefinedSymbol) return `unknown name "${undefinedSymbol[1]}" (not a unit, function or variable)`;
  if (/Unexpected type of argument in function (add|subtract)/.test(text)) return 'cannot add or subtract quantities of different dimensions';
  if (/Units do not match/.test(text)) return 'cannot add or subtract quantities of different dimensions';
  return text;
}

type Evaluated = { ok: true; value: VariableValue; usesVariables: boolean } | { ok: false; message: string; column?: number };

/** Evaluates an expression over the scope to a Unit or a finite number. */
function evaluateExpression(text: string, scope: VariableScope | undefined): Evaluated {
  const entry = compileExpression(text.trim());
  if ('error' in entry) return { ok: false, message: entry.error, ...(entry.column ? { column: entry.column } : {}) };
  const usesVariables = scope !== undefined && entry.node.filter((inner) => math.isSymbolNode(inner) && scope.has(inner.name)).length > 0;
  let value: unknown;
  try {
    value = entry.code.evaluate(scope ? new Map(scope) : new Map());
  } catch (error) {
    return { ok: false, message: readableMathError(error) };
  }
  if (typeof value === 'number') {
    return Number.isFinite(value) ? { ok: true, value, usesVariables } : { ok: false, message: `the value is not finite (${value})` };
  }
  if (isUnit(value)) {
    if (value.value === null) return { ok: false, message: `a unit without a number; write for example "1 ${value.toString()}"` };
    if (!Number.isFinite(value.toSI().toNumber())) return { ok: false, message: 'the value is not finite' };
    return { ok: true, value, usesVariables };
  }
  return { ok: false, message: 'the expression does not give a single number or quantity' };
}

function readUnit(
  text: string,
  kind: QuantityKind,
  scope?: VariableScope,
): { ok: true; unit: Unit; usesVariables: boolean } | { ok: false; message: string } {
  const evaluated = evaluateExpression(text, scope);
  if (!evaluated.ok) return { ok: false, message: `expected ${nounOf(kind)}, could not read "${text}" (${evaluated.message})` };
  if (typeof evaluated.value === 'number') {
    const example = kind === 'any' ? '12 mm' : QUANTITY_KINDS[kind].example;
    return {
      ok: false,
      message: `expected ${nounOf(kind)}, got "${text}" without a unit; write a plain number for SI or a string such as "${example}"`,
    };
  }
  return { ok: true, unit: evaluated.value, usesVariables: evaluated.usesVariables };
}

/**
 * Converts a sheet quantity (SI number, unit string or expression over `variables`) to its SI
 * value (m, rad, s, m/s, rad/s or 1/s by kind).
 */
export function parseQuantity(input: QuantityInput, kind: QuantityKind, variables?: VariableScope): QuantityResult {
  if (typeof input === 'number') {
    if (!Number.isFinite(input)) return { ok: false, message: `expected ${nounOf(kind)}, got ${input}` };
    return { ok: true, value: input };
  }
  const read = readUnit(input, kind, variables);
  if (!read.ok) return read;
  if (kind === 'any') return { ok: true, value: read.unit.toSI().toNumber() };
  const reference = referenceUnits.get(kind);
  if (!reference || !read.unit.equalBase(reference)) {
    const written = input.trim();
    const got = read.usesVariables ? `${written} = ${read.unit.toSI().toString()}` : written;
    return { ok: false, message: `expected ${nounOf(kind)}, got ${got}` };
  }
  return { ok: true, value: read.unit.toNumber(QUANTITY_KINDS[kind].si) };
}

/** The kind of quantity a value has (length, angle, ...), or null for a plain number or another dimension. */
export function kindOfValue(value: VariableValue): Exclude<QuantityKind, 'any'> | null {
  if (typeof value === 'number') return null;
  for (const [kind, reference] of referenceUnits) {
    if (value.equalBase(reference)) return kind as Exclude<QuantityKind, 'any'>;
  }
  return null;
}

/** A variable value as short text in SI, e.g. "0.014 m" or "0.5". */
export function formatVariableValue(value: VariableValue, significantDigits = 6): string {
  if (typeof value === 'number') return String(Number(value.toPrecision(significantDigits)));
  const kind = kindOfValue(value);
  const si = kind ? value.toNumber(QUANTITY_KINDS[kind].si) : value.toSI().toNumber();
  const unit = kind ? QUANTITY_KINDS[kind].si : value.toSI().formatUnits();
  return `${Number(si.toPrecision(significantDigits))} ${unit}`.trim();
}

export interface VariableIssue {
  /** 1-based line of the variables text. */
  line: number;
  /** 1-based column when the parser knows it. */
  column?: number;
  message: string;
}

export interface ParsedVariables {
  values: Map<string, VariableValue>;
  /** 1-based line on which each variable is defined. */
  lines: Map<string, number>;
  issues: VariableIssue[];
}

export const MAX_VARIABLE_LINES = 500;
const VARIABLE_NAME = /^[A-Za-z_][A-Za-z0-9_]*$/;

/** True when the name already means something in expressions (a unit, constant or function). */
function isReservedName(name: string): boolean {
  if (math.Unit.isValuelessUnit(name)) return true;
  return Object.hasOwn(math, name);
}

/**
 * Reads the variables text of a sheet: one `name = expression` per line (blank lines and
 * `# comments` allowed), each line may use the names defined above it. Every problem is
 * reported with its line; lines with problems define nothing.
 */
export function parseVariables(text: string): ParsedVariables {
  const values = new Map<string, VariableValue>();
  const lines = new Map<string, number>();
  const issues: VariableIssue[] = [];
  const rows = text.split(/\r?\n/);
  if (rows.length > MAX_VARIABLE_LINES) {
    issues.push({ line: MAX_VARIABLE_LINES + 1, message: `at most ${MAX_VARIABLE_LINES} lines of variables` });
  }
  rows.slice(0, MAX_VARIABLE_LINES).forEach((row, index) => {
    const line = index + 1;
    const code = row.replace(/#.*$/, '');
    if (code.trim() === '') return;
    const equals = code.indexOf('=');
    if (equals < 0) {
      issues.push({ line, column: code.search(/\S/) + 1, message: 'expected "name = value", for example "rollerRadius = 14 mm"' });
      return;
    }
    const name = code.slice(0, equals).trim();
    const nameColumn = code.search(/\S/) + 1;
    if (!VARIABLE_NAME.test(name)) {
      issues.push({ line, column: nameColumn, message: `"${name}" is not a name: use letters, digits and _ and start with a letter` });
      return;
    }
    if (isReservedName(name)) {
      issues.push({ line, column: nameColumn, message: `"${name}" is already a unit, constant or function; choose another name` });
      return;
    }
    const first = lines.get(name);
    if (first !== undefined) {
      issues.push({ line, column: nameColumn, message: `"${name}" is already defined on line ${first}` });
      return;
    }
    const expression = code.slice(equals + 1);
    if (expression.trim() === '') {
      issues.push({ line, column: equals + 2, message: `"${name}" has no value after "="` });
      return;
    }
    const evaluated = evaluateExpression(expression, values);
    if (!evaluated.ok) {
      const offset = equals + 1 + (expression.length - expression.trimStart().length);
      issues.push({ line, ...(evaluated.column ? { column: Math.min(offset + evaluated.column, code.length + 1) } : {}), message: evaluated.message });
      return;
    }
    values.set(name, evaluated.value);
    lines.set(name, line);
  });
  return { values, lines, issues };
}

/** SI value of a sheet quantity (units by kind); throws a RangeError with the parse message when it is not one. */
export function toSI(input: QuantityInput, kind: QuantityKind, variables?: VariableScope): number {
  const result = parseQuantity(input, kind, variables);
  if (!result.ok) throw new RangeError(result.message);
  return result.value;
}

/** Value of an SI quantity of the given kind expressed in displayUnit (e.g. 0.012 m in "mm" is 12). */
export function fromSI(valueSI: number, kind: Exclude<QuantityKind, 'any'>, displayUnit: string): number {
  const { si, noun } = QUANTITY_KINDS[kind];
  const target = readUnit(`1 ${displayUnit}`, kind);
  if (!target.ok) throw new RangeError(target.message);
  const reference = referenceUnits.get(kind);
  if (!reference || !target.unit.equalBase(reference)) {
    throw new RangeError(`cannot show ${noun} in ${displayUnit}`);
  }
  return math.unit(valueSI, si).toNumber(displayUnit);
}

/** Text of an SI quantity in displayUnit with the given significant digits, e.g. "12 mm" for 0.012 m. */
export function formatQuantity(
  valueSI: number,
  kind: Exclude<QuantityKind, 'any'>,
  displayUnit: string,
  significantDigits = 4,
): string {
  const shown = Number(fromSI(valueSI, kind, displayUnit).toPrecision(significantDigits));
  return `${Object.is(shown, -0) ? 0 : shown} ${displayUnit}`;
}
