/**
 * Checks a controller log against a sheet through a running Slipless server, for CI pipelines.
 * Usage: SLIPLESS_TOKEN=slp_... npm run check-log -- --url https://slipless.example --sheet <id>
 *          --log log.csv[.gz] --mapping mapping.json [--revision N] [--format json|csv]
 * The token comes from the environment only: a flag would show in process lists and CI logs.
 * The log is streamed to the server as it is read (a .gz log is sent compressed; the server tells
 * by its bytes), compared there with the sheet (its latest revision unless --revision) and kept
 * as a comparison tied to that revision. JSON (default) prints `{ title, comparison }` exactly as
 * `npm run compute -- --log` does; CSV the per-joint and per-contact statistics table.
 * Exit codes: 0 within tolerance, 3 outside, 1 bad input (the server's located errors on stderr),
 * 2 transport or authentication failure (unreachable server, refused or missing token, server error).
 */
import { createReadStream, realpathSync } from 'node:fs';
import { stat } from 'node:fs/promises';
import { request as httpRequest, type IncomingHttpHeaders } from 'node:http';
import { request as httpsRequest } from 'node:https';
import { basename } from 'node:path';
import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { fileURLToPath } from 'node:url';
import type { ErrorBody, LogComparisonRecord, LogUploadSummary, SheetPageData, Wire } from '../lib/contract';
import type { LogComparison } from '../lib/logs/compare';
import { comparisonReportJson, verdictExitCode } from '../lib/logs/report';
import { can, ROLES } from '../lib/roles';
import { SAFETY_CAUTION } from '../lib/safety';
import type { CommandOutput } from './compute';
import { InputError, readMappingFile } from './input-files';

const USAGE =
  'usage: SLIPLESS_TOKEN=slp_... npm run check-log -- --url <app origin> --sheet <sheet id> --log log.csv[.gz] --mapping mapping.json [--revision N] [--format json|csv]';

/** Exit status for bad input: arguments, files, or what the server refused about them. */
const BAD_INPUT = 1;
/** Exit status for a server that could not be reached, refused the token, or failed. */
const TRANSPORT = 2;

interface Options {
  url: URL;
  sheet: string;
  log: string;
  mapping: string;
  revision?: number;
  format: 'json' | 'csv';
}

/** Where the command writes and what it reads the token from. */
export interface CheckLogIo extends CommandOutput {
  env: { SLIPLESS_TOKEN?: string };
}

/** A failure that ends the command with `code` after printing `message`. */
class CheckFailure extends Error {
  constructor(
    readonly code: number,
    message: string,
  ) {
    super(message);
  }
}

/** Arguments the command cannot run with: printed with the usage line. */
class UsageError extends CheckFailure {
  constructor(message: string) {
    super(BAD_INPUT, message);
  }
}

/** Roles whose tokens may upload and compare logs, named in the refusal of any other. */
const UPLOADING_ROLES = ROLES.filter((role) => can(role, 'log.upload')).join(' or ');

const VALUE_OPTIONS = ['--url', '--sheet', '--log', '--mapping', '--revision', '--format'] as const;
type ValueOption = (typeof VALUE_OPTIONS)[number];

function parseArguments(args: readonly string[]): Options {
  const values: Partial<Record<ValueOption, string>> = {};
  for (let i = 0; i < args.length; i++) {
    const arg = args[i]!;
    if (arg === '--help' || arg === '-h') throw new UsageError('');
    const [name, inline] = arg.startsWith('--') && arg.includes('=') ? [arg.slice(0, arg.indexOf('=')), arg.slice(arg.indexOf('=') + 1)] : [arg, undefined];
    if (name === '--token') throw new UsageError('the token is read from SLIPLESS_TOKEN only (a flag would show in process lists)');
    if (!(VALUE_OPTIONS as readonly string[]).includes(name)) throw new UsageError(`unexpected argument ${arg}`);
    const value = inline ?? args[++i];
    if (value === undefined || value === '' || (inline === undefined && value.startsWith('--'))) throw new UsageError(`${name} needs a value`);
    values[name as ValueOption] = value;
  }
  const missing = (['--url', '--sheet', '--log', '--mapping'] as const).filter((name) => values[name] === undefined);
  if (missing.length) throw new UsageError(`missing ${missing.join(', ')}`);
  let url: URL;
  try {
    url = new URL(values['--url']!);
  } catch {
    throw new UsageError(`--url must be the app's origin, e.g. https://slipless.example, got ${values['--url']}`);
  }
  if (url.protocol !== 'https:' && url.protocol !== 'http:') throw new UsageError(`--url must be an http or https address, got ${url.protocol}`);
  const format = values['--format'] ?? 'json';
  if (format !== 'json' && format !== 'csv') throw new UsageError(`--format must be json or csv, got ${format}`);
  let revision: number | undefined;
  if (values['--revision'] !== undefined) {
    revision = Number(values['--revision']);
    if (!/^\d+$/.test(values['--revision']) || !Number.isSafeInteger(revision) || revision < 1) {
      throw new UsageError(`--revision must be a revision number (1, 2, ...), got ${values['--revision']}`);
    }
  }
  return { url, sheet: values['--sheet']!, log: values['--log']!, mapping: values['--mapping']!, format, ...(revision !== undefined ? { revision } : {}) };
}

/** An answer read whole (the API's JSON answers are small), or streamed to a sink when one is given for the expected status. */
interface Answer {
  status: number;
  headers: IncomingHttpHeaders;
  text: string;
}

/**
 * One HTTP request with node:http(s); a stream body is piped with backpressure, so a log is read
 * only as fast as the server takes it (Node's fetch keeps a streamed request body in memory to its
 * end, about the log's size). An answer that comes before the body is all sent (a refusal) ends
 * the upload. Redirects are not followed: they would carry the token elsewhere.
 */
function send(url: URL, method: string, headers: Record<string, string>, body?: string | Readable, sink?: { status: number; write: (chunk: string) => void }): Promise<Answer> {
  return new Promise((resolve, reject) => {
    const request = (url.protocol === 'https:' ? httpsRequest : httpRequest)(url, { method, headers }, (response) => {
      let text = '';
      // A per-sample table can be as long as the log, so it goes straight out rather than into memory.
      const streamed = sink !== undefined && response.statusCode === sink.status;
      // Decoded by the stream, so a character split between two chunks stays whole.
      response.setEncoding('utf8');
      response.on('data', (chunk: string) => (streamed ? sink.write(chunk) : (text += chunk)));
      response.on('error', reject);
      response.on('end', () => {
        resolve({ status: response.statusCode ?? 0, headers: response.headers, text });
        // Whatever of the log is unsent is not wanted any more.
        if (body instanceof Readable && !body.readableEnded) request.destroy();
      });
    });
    request.on('error', reject);
    if (body instanceof Readable) {
      // After an answer the upload may break off (the server closes once it refused); only a failure before it counts.
      pipeline(body, request).catch((error: unknown) => {
        if (!request.writableFinished) reject(error);
      });
    } else request.end(body);
  });
}

/** Talks to the API with the token, one request at a time; every answer but the expected one becomes a CheckFailure. */
class ApiClient {
  constructor(
    private readonly origin: URL,
    private readonly token: string,
    /** The mapping file, named beside the server's issues about the mapping's fields. */
    private readonly mappingFile: string,
  ) {}

  url(path: string): URL {
    // A --url with a base path (behind a proxy) keeps it.
    return new URL(path.replace(/^\//, ''), this.origin.href.endsWith('/') ? this.origin : `${this.origin.href}/`);
  }

  /** The answer to `method` at `path`, which must have `expected` status; `subject` names what went wrong in messages. */
  async request(
    path: string,
    { method, headers = {}, body, sink }: { method: string; headers?: Record<string, string>; body?: string | Readable; sink?: (chunk: string) => void },
    expected: number,
    subject: { label: string; file?: string },
  ): Promise<Answer> {
    const url = this.url(path);
    let answer: Answer;
    try {
      answer = await send(url, method, { ...headers, authorization: `Bearer ${this.token}`, accept: 'application/json' }, body, sink ? { status: expected, write: sink } : undefined);
    } catch (error) {
      throw new CheckFailure(TRANSPORT, `cannot reach ${url.origin} (${error instanceof Error ? error.message : String(error)})`);
    }
    if (answer.status === expected) return answer;
    throw refusal(answer, url, subject, this.mappingFile);
  }
}

/** A successful answer's JSON; a page that is not JSON (a proxy's, say) is a transport failure. */
function answerJson<T>(answer: Answer, subject: string): T {
  try {
    return JSON.parse(answer.text) as T;
  } catch {
    throw new CheckFailure(TRANSPORT, `the answer for ${subject} is not JSON (is --url the Slipless app itself?): ${answer.text.slice(0, 80)}`);
  }
}

/** The server's error body, or null for an answer that is not one (a proxy's page). */
function errorBody(answer: Answer): Wire<ErrorBody>['error'] | null {
  try {
    const body = JSON.parse(answer.text) as Partial<Wire<ErrorBody>>;
    return body.error && typeof body.error.message === 'string' ? body.error : null;
  } catch {
    return null;
  }
}

/** Located issues (a log's line and column, a mapping's field) as lines prefixed by the file they are in. */
function issueLines(error: Wire<ErrorBody>['error'], subject: { label: string; file?: string }, mappingFile: string): string[] {
  const issues = (error.issues ?? []) as { message: string; path?: string; line?: number }[];
  if (!issues.length) return [`${subject.file ?? subject.label}: ${error.path ? `${error.path}: ` : ''}${error.message}`];
  return issues.map((issue) => (issue.path !== undefined && issue.line === undefined ? `${mappingFile}: ${issue.path}: ${issue.message}` : `${subject.file ?? subject.label}: ${issue.message}`));
}

/** The failure for an unexpected answer: bad input for 4xx about the request, transport for the rest. */
function refusal(answer: Answer, url: URL, subject: { label: string; file?: string }, mappingFile: string): CheckFailure {
  const { status } = answer;
  if (status >= 300 && status < 400) {
    return new CheckFailure(TRANSPORT, `${url.origin} answered ${status} redirecting to ${answer.headers.location ?? 'elsewhere'}: give that origin as --url`);
  }
  const error = errorBody(answer);
  const said = error?.message ?? `HTTP ${status}`;
  if (status === 401) return new CheckFailure(TRANSPORT, `the server refused the token in SLIPLESS_TOKEN (${said})`);
  if (status === 403) return new CheckFailure(TRANSPORT, `the token may not do this (${said}): ${subject.label} needs a token with the ${UPLOADING_ROLES} role`);
  if (status === 404 || status === 400 || status === 413 || status === 422) {
    const lines = error ? issueLines(error, subject, mappingFile) : [`${subject.label}: HTTP ${status}`];
    return new CheckFailure(BAD_INPUT, lines.join('\n'));
  }
  return new CheckFailure(TRANSPORT, `${url.origin} answered ${status} for ${subject.label} (${said})`);
}

/** The log as a stream for the request body, and its size for Content-Length (so an over-size log is refused before it is sent). */
async function openLog(file: string): Promise<{ body: Readable; size: number }> {
  let size: number;
  try {
    const info = await stat(file);
    if (!info.isFile()) throw Object.assign(new Error('not a file'), { code: 'EISDIR' });
    size = info.size;
  } catch (error) {
    throw new CheckFailure(BAD_INPUT, `${file}: cannot read the file (${(error as NodeJS.ErrnoException).code ?? String(error)})`);
  }
  const stream = createReadStream(file);
  await new Promise<void>((resolve, reject) => {
    stream.once('open', () => resolve());
    stream.once('error', (error: NodeJS.ErrnoException) => reject(new CheckFailure(BAD_INPUT, `${file}: cannot read the file (${error.code ?? String(error)})`)));
  });
  return { body: stream, size };
}

async function check(options: Options, token: string, io: CheckLogIo): Promise<number> {
  const { raw: mapping } = readMappingFile(options.mapping);
  const api = new ApiClient(options.url, token, options.mapping);
  const sheetPath = `api/sheets/${encodeURIComponent(options.sheet)}`;
  // Asked first so a wrong token, sheet or revision fails before a large log is sent.
  const sheetResponse = await api.request(`${sheetPath}${options.revision ? `?revision=${options.revision}` : ''}`, { method: 'GET' }, 200, { label: `sheet ${options.sheet}` });
  const { revision } = answerJson<Pick<Wire<SheetPageData>, 'revision'>>(sheetResponse, `sheet ${options.sheet}`);
  const inputs = revision.inputs as { title?: unknown };
  // The document's own title at that revision, as `compute` prints the title of the document it read.
  const title = typeof inputs.title === 'string' ? inputs.title : '';

  const log = await openLog(options.log);
  const uploaded = await api.request(
    `${sheetPath}/logs?fileName=${encodeURIComponent(basename(options.log))}`,
    { method: 'POST', body: log.body, headers: { 'content-type': 'application/octet-stream', 'content-length': String(log.size) } },
    201,
    { label: 'uploading the log', file: options.log },
  );
  const upload = answerJson<Wire<LogUploadSummary>>(uploaded, 'uploading the log');

  const logPath = `${sheetPath}/logs/${encodeURIComponent(upload.id)}`;
  const compared = await api.request(
    `${logPath}/comparisons`,
    { method: 'POST', body: JSON.stringify({ mapping, revision: revision.number }), headers: { 'content-type': 'application/json' } },
    201,
    { label: 'comparing the log', file: options.log },
  );
  const record = answerJson<Wire<LogComparisonRecord>>(compared, 'comparing the log');
  if (!record.result) throw new CheckFailure(TRANSPORT, `the server stored comparison ${record.id} without a result`);
  const comparison = record.result as LogComparison;
  if (options.format === 'csv') {
    // The per-sample table, as `compute --log --format csv` prints it: the server re-reads the stored log against this comparison.
    await api.request(`${logPath}/comparisons/${encodeURIComponent(record.id)}?format=series`, { method: 'GET', sink: io.stdout }, 200, { label: 'the per-sample table' });
  } else io.stdout(comparisonReportJson(title, comparison));
  io.stderr(`check-log: revision ${record.revision} of sheet ${options.sheet}: ${comparison.verdict.withinTolerance ? 'within tolerance' : 'outside tolerance'}${comparison.verdict.reasons.length ? `\n  ${comparison.verdict.reasons.join('\n  ')}` : ''}\n`);
  return verdictExitCode(comparison);
}

/** Runs the check-log command on its arguments and resolves to the exit status (0 within tolerance, 3 outside, 1 bad input, 2 transport or authentication failure). */
export async function runCheckLogCommand(args: readonly string[], io: CheckLogIo): Promise<number> {
  const report = (text: string) => io.stderr(`${text}\n`);
  report(SAFETY_CAUTION);
  try {
    const options = parseArguments(args);
    const token = io.env.SLIPLESS_TOKEN?.trim();
    if (!token) throw new CheckFailure(TRANSPORT, `set SLIPLESS_TOKEN to an API token of the sheet's team (${UPLOADING_ROLES} role), e.g. from the CI secret store`);
    return await check(options, token, io);
  } catch (error) {
    if (error instanceof InputError) {
      report(error.message);
      return BAD_INPUT;
    }
    if (!(error instanceof CheckFailure)) throw error;
    if (error.message) report(`check-log: ${error.message}`);
    if (error instanceof UsageError) report(USAGE);
    return error.code;
  }
}

const invokedDirectly = process.argv[1] !== undefined && realpathSync(process.argv[1]) === realpathSync(fileURLToPath(import.meta.url));
if (invokedDirectly) {
  process.exitCode = await runCheckLogCommand(process.argv.slice(2), {
    stdout: (text) => process.stdout.write(text),
    stderr: (text) => process.stderr.write(text),
    env: { SLIPLESS_TOKEN: process.env.SLIPLESS_TOKEN },
  });
}
