/**
 * Answer times of the built app's sign-in endpoints for existing and unknown accounts (a script,
 * not a test: timings on a shared machine are too noisy to assert). Starts the app on its own
 * database, then times wrong-password sign-ins and e-mail link requests in interleaved rounds, each
 * request from its own loopback address so the per-address limits stay out of the way, and prints
 * the distinct answers seen with the median and quartiles of each kind.
 *
 *   npm run build && npm run measure:sign-in [-- password rounds=60 link rounds=60]
 */
import http from 'node:http';
import { openDatabase } from '../../src/db';
import { users } from '../../src/db/schema';
import { DEMO_USERS } from '../../src/lib/server/demo';
import { freePort, tempDatabaseUrl } from '../helpers/temp';
import { startApp } from './app-process';

interface Answer {
  status: number;
  location: string;
  body: string;
  setCookies: string[];
  ms: number;
}

function send(baseUrl: string, method: string, path: string, localAddress: string, headers: Record<string, string> = {}, body = ''): Promise<Answer> {
  const url = new URL(path, baseUrl);
  return new Promise((resolve, reject) => {
    const started = process.hrtime.bigint();
    const request = http.request(
      {
        host: url.hostname,
        port: url.port,
        path: url.pathname + url.search,
        method,
        localAddress,
        agent: false,
        headers: { origin: baseUrl, ...headers, ...(body ? { 'content-length': Buffer.byteLength(body) } : {}) },
      },
      (response) => {
        let text = '';
        response.on('data', (chunk) => (text += chunk));
        response.on('end', () =>
          resolve({
            status: response.statusCode ?? 0,
            location: String(response.headers.location ?? '').replace(baseUrl, ''),
            body: text,
            setCookies: response.headers['set-cookie'] ?? [],
            ms: Number(process.hrtime.bigint() - started) / 1e6,
          }),
        );
      },
    );
    request.on('error', reject);
    request.end(body);
  });
}

let sent = 0;
/** A fresh 127.0.x.y source address; Linux routes all of 127.0.0.0/8 to the loopback interface. */
function nextAddress(): string {
  const n = sent++;
  return `127.0.${10 + Math.floor(n / 250)}.${1 + (n % 250)}`;
}

/** Posts a form to an Auth.js endpoint with a CSRF token and cookie fetched from the same address; times the post only. */
async function postForm(baseUrl: string, path: string, fields: Record<string, string>): Promise<Answer> {
  const address = nextAddress();
  const csrf = await send(baseUrl, 'GET', '/api/auth/csrf', address);
  const cookie = csrf.setCookies.map((c) => c.split(';')[0]).join('; ');
  const form = new URLSearchParams({ ...fields, csrfToken: JSON.parse(csrf.body).csrfToken, callbackUrl: `${baseUrl}/sheets` });
  return send(baseUrl, 'POST', path, address, { 'content-type': 'application/x-www-form-urlencoded', cookie }, form.toString());
}

function quantile(values: number[], q: number): number {
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.min(sorted.length - 1, Math.floor(q * sorted.length))];
}

/** Runs `rounds` pairs (order alternating), after `warmUp` untimed ones, and prints what was seen. */
async function compare(title: string, rounds: number, warmUp: number, attempt: (kind: 'known' | 'unknown', round: number) => Promise<Answer>) {
  const times = { known: [] as number[], unknown: [] as number[] };
  const answers = new Set<string>();
  for (let round = -warmUp; round < rounds; round++) {
    for (const kind of round % 2 ? (['known', 'unknown'] as const) : (['unknown', 'known'] as const)) {
      const answer = await attempt(kind, round);
      const cookies = answer.setCookies.map((c) => c.split('=')[0]).sort().join(',');
      answers.add(`${answer.status} ${answer.location} body ${answer.body.length} B, cookies ${cookies || 'none'}`);
      if (round >= 0) times[kind].push(answer.ms);
    }
  }
  console.log(`${title}: ${rounds} interleaved rounds`);
  console.log(`  answers seen: ${[...answers].join(' | ')}`);
  for (const kind of ['known', 'unknown'] as const) {
    const [q1, median, q3] = [0.25, 0.5, 0.75].map((q) => quantile(times[kind], q).toFixed(1));
    console.log(`  ${kind.padEnd(7)} median ${median} ms (quartiles ${q1}–${q3})`);
  }
}

const passwordRounds = Number(process.argv[2] ?? 60);
const linkRounds = Number(process.argv[3] ?? 60);
const databaseUrl = tempDatabaseUrl();
const app = await startApp({ port: await freePort(), databaseUrl, env: { ...process.env, AUTH_SECRET: 'timing-script-secret-0123456789abcdef' } });
try {
  const database = await openDatabase(databaseUrl);
  // One account per link round keeps every known request under the per-recipient limit, so each one is mailed.
  await database.write((db) =>
    db.insert(users).values(Array.from({ length: linkRounds }, (_, i) => ({ email: `link-${i}@timing.example`, name: `Link ${i}` }))),
  );
  database.close();

  await compare('password sign-in with a wrong password', passwordRounds, 3, (kind, round) =>
    postForm(app.baseUrl, '/api/auth/callback/credentials', {
      email: kind === 'known' ? DEMO_USERS[(round + DEMO_USERS.length) % DEMO_USERS.length].email : `nobody-${round + 10}@timing.example`,
      password: 'not the password',
    }),
  );
  await compare('e-mail link request', linkRounds, 0, (kind, round) =>
    postForm(app.baseUrl, '/api/auth/signin/nodemailer', { email: kind === 'known' ? `link-${round}@timing.example` : `nobody-link-${round}@timing.example` }),
  );
} finally {
  await app.stop();
}
