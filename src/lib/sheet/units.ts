/**
 * Physical quantities at the edges of the product. Sheet documents may write a quantity as a
 * plain number (already SI: m, rad, s, m/s, rad/s, 1/s), as a string with a unit ("12 mm",
 * "30 deg", "0.5 rad/s", "20 mm/s"), or as an expression with units over the sheet's variables
 * ("rollerRadius + 2 mm", "2*pi rad/s"). Everything inside the core is SI.
 */
import {
  absDependencies, acosDependencies, addDependencies, asinDependencies, atan2Dependencies, atanDependencies, cosDependencies,
  create, createUnitDependencies, eDependencies, hypotDependencies, isUnit,
  multiplyDependencies, divideDependencies, parseDependencies, piDependencies, powDependencies, sinDependencies, sqrtDependencies,
  subtractDependencies, tanDependencies, tauDependencies, unaryMinusDependencies, unaryPlusDependencies, unitDependencies,
  type MathNode, type Unit,
} from 'mathjs';
import { BoundedCache } from './bounded-cache';
import { QUANTITY_KINDS, type QuantityKind } from './quantity-kinds';

export { QUANTITY_KINDS, type QuantityKind };

/**
 * A private mathjs instance so that the extra units below never leak into other users of mathjs;
 * built from the few functions that expressions need so that browsers load only those.
 * Predictable: a square root of a negative number is NaN (refused as not finite), never a complex number.
 */
const math = create(
  {
    unitDependencies, createUnitDependencies, parseDependencies,
    addDependencies, subtractDependencies, multiplyDependencies, divideDependencies, powDependencies,
    unaryMinusDependencies, unaryPlusDependencies, piDependencies, eDependencies, tauDependencies,
    sqrtDependencies, absDependencies, hypotDependencies,
    sinDependencies, cosDependencies, tanDependencies, asinDependencies, acosDependencies, atanDependencies, atan2Dependencies,
  },
  { predictable: true },
);
// min and max are left out on purpose: "min" must stay the unit minute.
// Motor data sheets give speeds in revolutions per minute: one cycle (a full turn, 2 pi rad) per minute.
math.createUnit('rpm', '1 cycle/min');

const parseText = math.parse;
const { Unit: UnitType } = math;

/*
 * The instance is shared by every sheet in the process (and every request on the server), so
 * nothing may change it once the units above exist. Expressions never reach it (the evaluator
 * below calls only the listed functions), and as a second wall the functions that could change
 * it are replaced by ones that refuse, as the mathjs security notes advise. config stays: the
 * instance's functions are built lazily and read their settings through it.
 */
const refuse = (name: string) => () => {
  throw new Error(`${name} is disabled in sheet expressions`);
};
math.import(
  Object.fromEntries(['import', 'createUnit', 'evaluate', 'parse', 'compile', 'simplify', 'derivative', 'resolve', 'reviver'].map((name) => [name, refuse(name)])),
  { override: true },
);

/** A quantity as written in a sheet document: a number in SI units or a string with a unit. */
export type QuantityInput = number | string;

export type QuantityResult = { ok: true; value: number } | { ok: false; message: string };

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

/** Longest expression: a quantity field or the value of one variable. */
export const MAX_EXPRESSION_LENGTH = 500;
/** Deepest nesting of parentheses, brackets and function calls in one expression. */
export const MAX_EXPRESSION_NESTING = 20;
/** Most numbers, names and operators in one expression; evaluation does one step per node. */
export const MAX_EXPRESSION_NODES = 200;
/**
 * Most unit factors in one value. mathjs keeps "a * b" as the units of a followed by those of
 * b, so a variable multiplied by itself on each line would double its size per line.
 */
export const MAX_UNIT_TERMS = 32;
/**
 * Most operations in all expressions of one sheet together (variables and fields). Reading a
 * sheet runs on the server's event loop; at a few microseconds per operation this keeps the
 * largest sheet to tens of milliseconds (see src/cli/validation-cost.ts).
 */
export const MAX_SHEET_OPERATIONS = 2000;

/** What is left of one sheet's operations; create one per sheet read with createExpressionBudget. */
export interface ExpressionBudget {
  remaining: number;
}

export function createExpressionBudget(): ExpressionBudget {
  return { remaining: MAX_SHEET_OPERATIONS };
}

/** The functions expressions may call; min and max stay out so that "min" is the minute. */
const FUNCTIONS: Readonly<Record<string, (...args: never[]) => unknown>> = {
  sqrt: math.sqrt, abs: math.abs, hypot: math.hypot,
  sin: math.sin, cos: math.cos, tan: math.tan, asin: math.asin, acos: math.acos, atan: math.atan, atan2: math.atan2,
};
const FUNCTION_LIST = Object.keys(FUNCTIONS).join(', ');
const CONSTANTS: ReadonlyMap<string, number> = new Map([['pi', math.pi], ['e', math.e], ['tau', math.tau]]);
const OPERATORS: Readonly<Record<string, (...args: never[]) => unknown>> = {
  add: math.add, subtract: math.subtract, multiply: math.multiply, divide: math.divide, pow: math.pow,
  unaryMinus: math.unaryMinus, unaryPlus: math.unaryPlus,
};
const COMPARISONS = new Set(['equal', 'unequal', 'smaller', 'larger', 'smallerEq', 'largerEq', 'compare']);
const ALLOWED = `expressions may use numbers, units, variables, + - * / ^, parentheses, pi, e, tau and ${FUNCTION_LIST}`;

/** An expression outside what sheets allow; its message says what is not allowed. */
class Refused extends Error {}

type Evaluate = (scope: VariableScope) => VariableValue;

function checked(value: unknown): VariableValue {
  if (typeof value === 'number') return value;
  if (isUnit(value)) {
    if (value.units.length > MAX_UNIT_TERMS) throw new Refused(`the value multiplies too many units together: at most ${MAX_UNIT_TERMS} units`);
    return value;
  }
  throw new Refused('the expression does not give a single number or quantity');
}

function describeConstant(value: unknown): string {
  return typeof value === 'string' ? 'text in quotes is not allowed; write the quantity itself, e.g. 12 mm' : `"${String(value)}" is not a number or quantity`;
}

/**
 * Turns a parsed expression into a function of the variables, allowing only numbers, units,
 * variables, the listed constants, arithmetic and the listed functions. Nothing it builds can
 * reach the mathjs instance, so no expression can change what another one computes.
 */
function compileNode(node: MathNode, count: { nodes: number }): Evaluate {
  count.nodes += 1;
  if (count.nodes > MAX_EXPRESSION_NODES) {
    throw new Refused(`the expression is too long: at most ${MAX_EXPRESSION_NODES} operations (numbers, names and operators)`);
  }
  switch (node.type) {
    case 'ConstantNode': {
      const { value } = node as unknown as { value: unknown };
      if (typeof value !== 'number') throw new Refused(describeConstant(value));
      return () => value;
    }
    case 'SymbolNode':
      return compileSymbol((node as unknown as { name: string }).name);
    case 'ParenthesisNode':
      return compileNode((node as unknown as { content: MathNode }).content, count);
    case 'OperatorNode': {
      const { fn, op, args } = node as unknown as { fn: string; op: string; args: MathNode[] };
      if (COMPARISONS.has(fn)) throw new Refused(`comparisons ("${op}") are not allowed; ${ALLOWED}`);
      const operator = OPERATORS[fn];
      if (!operator) throw new Refused(`the operator "${op}" is not allowed; ${ALLOWED}`);
      const parts = args.map((arg) => compileNode(arg, count));
      return parts.length === 1
        ? (scope) => checked((operator as (a: VariableValue) => unknown)(parts[0](scope)))
        : (scope) => checked((operator as (a: VariableValue, b: VariableValue) => unknown)(parts[0](scope), parts[1](scope)));
    }
    case 'FunctionNode': {
      const { fn, args } = node as unknown as { fn: MathNode; args: MathNode[] };
      const name = math.isSymbolNode(fn) ? fn.name : undefined;
      const call = name !== undefined && Object.hasOwn(FUNCTIONS, name) ? FUNCTIONS[name] : undefined;
      if (!call) {
        throw new Refused(name === undefined ? `only named functions may be called; ${ALLOWED}` : `the function ${name} is not allowed; ${ALLOWED}`);
      }
      const parts = args.map((arg) => compileNode(arg, count));
      return (scope) => checked((call as (...values: VariableValue[]) => unknown)(...parts.map((part) => part(scope))));
    }
    case 'AssignmentNode':
    case 'FunctionAssignmentNode':
    case 'BlockNode':
      throw new Refused('a field takes a value, not an assignment or a list of statements');
    case 'AccessorNode': {
      const { index } = node as unknown as { index: { dotNotation?: boolean } };
      throw new Refused(index.dotNotation ? `property access (".") is not allowed; ${ALLOWED}` : `indexing with [ ] is not allowed; ${ALLOWED}`);
    }
    case 'IndexNode':
      throw new Refused(`indexing with [ ] is not allowed; ${ALLOWED}`);
    case 'ArrayNode':
      throw new Refused(`lists [ ] are not allowed; ${ALLOWED}`);
    case 'ObjectNode':
      throw new Refused(`objects { } are not allowed; ${ALLOWED}`);
    case 'ConditionalNode':
      throw new Refused(`conditions (a ? b : c) are not allowed; ${ALLOWED}`);
    case 'RelationalNode':
      throw new Refused(`comparisons are not allowed; ${ALLOWED}`);
    case 'RangeNode':
      throw new Refused(`ranges (a:b) are not allowed; ${ALLOWED}`);
    default:
      throw new Refused(`${node.type} is not allowed; ${ALLOWED}`);
  }
}

function compileSymbol(name: string): Evaluate {
  const constant = CONSTANTS.get(name);
  if (constant !== undefined) return () => constant;
  if (Object.hasOwn(FUNCTIONS, name)) throw new Refused(`the function ${name} needs arguments in parentheses, e.g. ${name}(...)`);
  const isUnitName = UnitType.isValuelessUnit(name);
  // Variables cannot take a unit's name (see isReservedName), so a unit name is always the unit.
  if (isUnitName) return () => new UnitType(null as unknown as number, name);
  if (Object.hasOwn(math, name)) throw new Refused(`"${name}" is not allowed; ${ALLOWED}`);
  return (scope) => {
    const value = scope.get(name);
    if (value === undefined) throw new Refused(`unknown name "${name}" (not a unit, function or variable)`);
    return value;
  };
}

/** The deepest nesting of brackets in the text, measured before parsing so that the parser never recurses deeply. */
function bracketDepth(text: string): number {
  let depth = 0;
  let deepest = 0;
  for (const char of text) {
    if (char === '(' || char === '[' || char === '{') deepest = Math.max(deepest, ++depth);
    else if (char === ')' || char === ']' || char === '}') depth -= 1;
  }
  return deepest;
}

const COMPILED_CACHE_SIZE = 4000;

type Compiled =
  | {
      code: Evaluate;
      symbols: readonly string[];
      nodes: number;
      /** The value when no symbol is a variable: it then depends on the text alone, and an edit elsewhere in the sheet reads it again unchanged. */
      constant?: Evaluated;
      /** The value over each sealed variables scope (see readSheetVariables) it uses: those never change. */
      overSealed?: WeakMap<VariableScope, Evaluated>;
    }
  | { error: string; column?: number };

const compiled = new BoundedCache<string, Compiled>(COMPILED_CACHE_SIZE);

/** Variables scopes that never change again: the values of a sheet's variables text read by readSheetVariables. */
const sealedScopes = new WeakSet<VariableScope>();

function compileText(text: string): Compiled {
  if (text.length > MAX_EXPRESSION_LENGTH) return { error: `the expression is too long: at most ${MAX_EXPRESSION_LENGTH} characters` };
  if (bracketDepth(text) > MAX_EXPRESSION_NESTING) return { error: `the expression is nested too deeply: at most ${MAX_EXPRESSION_NESTING} levels of parentheses and function calls` };
  let node: MathNode;
  try {
    node = parseText(text);
  } catch (error) {
    // mathjs reports the 1-based position at which it gave up.
    const column = (error as { char?: number }).char;
    return { error: readableMathError(error), ...(typeof column === 'number' ? { column } : {}) };
  }
  try {
    const count = { nodes: 0 };
    const code = compileNode(node, count);
    const symbols = node.filter((inner) => math.isSymbolNode(inner)).map((inner) => (inner as unknown as { name: string }).name);
    return { code, symbols, nodes: count.nodes };
  } catch (error) {
    if (error instanceof Refused) return { error: error.message };
    throw error;
  }
}

/** Parses and compiles an expression once; the sheet is read again on every keystroke, so this is cached. */
function compileExpression(text: string): Compiled {
  let entry = compiled.get(text);
  if (entry) return entry;
  entry = compileText(text);
  compiled.set(text, entry);
  return entry;
}

/** The operations a text takes of a sheet's budget when it is read as a quantity (none when it does not read). */
export function expressionOperations(text: string): number {
  const entry = compileExpression(text.trim());
  return 'error' in entry ? 0 : entry.nodes;
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
function evaluateExpression(text: string, scope: VariableScope | undefined, budget: ExpressionBudget | undefined): Evaluated {
  const overBudget = { ok: false, message: `the sheet's expressions are too long together: at most ${MAX_SHEET_OPERATIONS} operations in one sheet` } as const;
  if (budget && budget.remaining <= 0) return overBudget;
  const entry = compileExpression(text.trim());
  if ('error' in entry) return { ok: false, message: entry.error, ...(entry.column ? { column: entry.column } : {}) };
  if (budget) {
    budget.remaining -= entry.nodes;
    if (budget.remaining < 0) return overBudget;
  }
  const variables = scope ?? new Map<string, VariableValue>();
  const usesVariables = entry.symbols.some((name) => variables.has(name));
  if (usesVariables) {
    if (!sealedScopes.has(variables)) return evaluateCompiled(entry, variables, true);
    entry.overSealed ??= new WeakMap();
    let evaluated = entry.overSealed.get(variables);
    if (evaluated === undefined) {
      evaluated = evaluateCompiled(entry, variables, true);
      entry.overSealed.set(variables, evaluated);
    }
    return evaluated;
  }
  entry.constant ??= evaluateCompiled(entry, variables, false);
  return entry.constant;
}

/** Runs a compiled expression over the variables to a Unit or a finite number. */
function evaluateCompiled(entry: Extract<Compiled, { code: Evaluate }>, variables: VariableScope, usesVariables: boolean): Evaluated {
  let value: VariableValue;
  try {
    value = entry.code(variables);
  } catch (error) {
    return { ok: false, message: error instanceof Refused ? error.message : readableMathError(error) };
  }
  if (typeof value === 'number') {
    return Number.isFinite(value) ? { ok: true, value, usesVariables } : { ok: false, message: `the value is not a finite number (${value})` };
  }
  if (value.value === null) return { ok: false, message: `a unit without a number; write for example "1 ${value.toString()}"` };
  if (!Number.isFinite(value.value)) return { ok: false, message: `the value is not a finite number (${value.value})` };
  return { ok: true, value, usesVariables };
}

function readUnit(
  text: string,
  kind: QuantityKind,
  scope?: VariableScope,
  budget?: ExpressionBudget,
): { ok: true; unit: Unit; usesVariables: boolean; evaluated: Evaluated } | { ok: false; message: string } {
  const evaluated = evaluateExpression(text, scope, budget);
  if (!evaluated.ok) return { ok: false, message: `expected ${nounOf(kind)}, could not read "${text}" (${evaluated.message})` };
  if (typeof evaluated.value === 'number') {
    const example = kind === 'any' ? '12 mm' : QUANTITY_KINDS[kind].example;
    return {
      ok: false,
      message: `expected ${nounOf(kind)}, got "${text}" without a unit; write a plain number for SI or a string such as "${example}"`,
    };
  }
  return { ok: true, unit: evaluated.value, usesVariables: evaluated.usesVariables, evaluated };
}

/** A read quantity checked against its kind and converted to the kind's SI unit. */
function convertUnit(unit: Unit, kind: QuantityKind, input: string, usesVariables: boolean): QuantityResult {
  if (kind === 'any') return { ok: true, value: unit.toSI().toNumber() };
  const reference = referenceUnits.get(kind);
  if (!reference || !unit.equalBase(reference)) {
    const written = input.trim();
    const got = usesVariables ? `${written} = ${unit.toSI().toString()}` : written;
    return { ok: false, message: `expected ${nounOf(kind)}, got ${got}` };
  }
  return { ok: true, value: unit.toNumber(QUANTITY_KINDS[kind].si) };
}

/**
 * The conversions of an evaluation by kind. An evaluation is one object per text (and per sealed variables scope, see
 * readSheetVariables) that the expression cache keeps, so this lives exactly as long as that entry; the conversion (mathjs
 * reads the target unit's text each time) was most of reading a sheet whose texts had all been read before.
 */
const conversions = new WeakMap<Evaluated, Partial<Record<QuantityKind, QuantityResult>>>();

/**
 * Converts a sheet quantity (SI number, unit string or expression over `variables`) to its SI
 * value (m, rad, s, m/s, rad/s, m/s^2, rad/s^2 or 1/s by kind). `budget`, when given, pays for the expression's operations.
 */
export function parseQuantity(input: QuantityInput, kind: QuantityKind, variables?: VariableScope, budget?: ExpressionBudget): QuantityResult {
  if (typeof input === 'number') {
    if (!Number.isFinite(input)) return { ok: false, message: `expected ${nounOf(kind)}, got ${input}` };
    return { ok: true, value: input };
  }
  const read = readUnit(input, kind, variables, budget);
  if (!read.ok) return read;
  // An evaluation over variables that may still change is made anew each time: nothing to keep.
  if (read.usesVariables && !(variables && sealedScopes.has(variables))) return convertUnit(read.unit, kind, input, true);
  let known = conversions.get(read.evaluated);
  if (known === undefined) {
    known = {};
    conversions.set(read.evaluated, known);
  }
  return (known[kind] ??= convertUnit(read.unit, kind, input, read.usesVariables));
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
 * reported with its line; lines with problems define nothing. `budget`, when given, pays for the operations.
 */
export function parseVariables(text: string, budget?: ExpressionBudget): ParsedVariables {
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
    const evaluated = evaluateExpression(expression, values, budget);
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

/** Distinct variables texts remembered (each at most MAX_VARIABLES_TEXT characters with its values), read on a budget and without. */
const SHEET_VARIABLES_CACHE_SIZE = 64;
const sheetVariables = new BoundedCache<string, { parsed: ParsedVariables; spent: number }>(SHEET_VARIABLES_CACHE_SIZE);
const unbudgetedSheetVariables = new BoundedCache<string, ParsedVariables>(SHEET_VARIABLES_CACHE_SIZE);

/**
 * A sheet's variables text read as parseVariables does on a sheet's new budget (or, without one, on none: the editor's
 * hints show every line however long the expressions are together), once per distinct text: a sheet is read again on
 * every keystroke and every save, and its variables rarely change. The result is shared, so callers only read it; its
 * values are sealed, so quantities over them are evaluated once too. A budget already drawn on reads as usual.
 */
export function readSheetVariables(text: string, budget?: ExpressionBudget): ParsedVariables {
  if (budget === undefined) {
    let parsed = unbudgetedSheetVariables.get(text);
    if (parsed === undefined) {
      parsed = parseVariables(text);
      sealedScopes.add(parsed.values);
      unbudgetedSheetVariables.set(text, parsed);
    }
    return parsed;
  }
  if (budget.remaining !== MAX_SHEET_OPERATIONS) return parseVariables(text, budget);
  const known = sheetVariables.get(text);
  if (known !== undefined) {
    budget.remaining -= known.spent;
    return known.parsed;
  }
  const parsed = parseVariables(text, budget);
  sealedScopes.add(parsed.values);
  sheetVariables.set(text, { parsed, spent: MAX_SHEET_OPERATIONS - budget.remaining });
  return parsed;
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

const factors = new Map<string, number>();

/**
 * How many `to` make one `from`, by mathjs (e.g. 1000 from "m" to "mm", 60 / (2 pi) from "rad/s" to "rpm"); cached per pair,
 * since the results redraw hundreds of numbers per keystroke. Only for units without an offset (no temperatures), so a factor is the whole conversion.
 */
export function unitFactor(from: string, to: string): number {
  if (from === to) return 1;
  const key = `${from}\u0000${to}`;
  let factor = factors.get(key);
  if (factor === undefined) {
    factor = math.unit(1, from).toNumber(to);
    factors.set(key, factor);
  }
  return factor;
}

/** A quantity written as text, read without a field's kind: the kind it has and its SI value, or why it does not read. */
export type QuantityTextReading =
  | { ok: true; kind: Exclude<QuantityKind, 'any'> | null; value: number }
  | { ok: false; message: string };

/**
 * Reads a quantity text the way parseQuantity reads it for a field of its own kind (same expression,
 * same SI unit per kind), so one reading serves whichever field holds the text; a plain-number
 * result or another dimension has kind null (value in base SI units).
 */
export function readQuantityText(text: string, variables?: VariableScope): QuantityTextReading {
  const evaluated = evaluateExpression(text, variables, undefined);
  if (!evaluated.ok) return { ok: false, message: evaluated.message };
  // As in parseQuantity: an evaluation the expression cache keeps keeps its reading, since converting is the costly part.
  const kept = !evaluated.usesVariables || (variables !== undefined && sealedScopes.has(variables));
  let reading = kept ? textReadings.get(evaluated) : undefined;
  if (reading === undefined) {
    reading = readingOf(evaluated.value);
    if (kept) textReadings.set(evaluated, reading);
  }
  return reading;
}

/** The readings of kept evaluations (see readQuantityText); each is handed to every caller, who only reads it. */
const textReadings = new WeakMap<Evaluated, QuantityTextReading>();

function readingOf(value: VariableValue): QuantityTextReading {
  if (typeof value === 'number') return { ok: true, kind: null, value };
  const kind = kindOfValue(value);
  return { ok: true, kind, value: kind ? value.toNumber(QUANTITY_KINDS[kind].si) : value.toSI().toNumber() };
}
