// The load run behind `npm run load`: loopback only, every section bounded in time. It reads
// the runs list under many connections with session cookies and with API tokens, holds many
// event-stream watchers on running runs, and sends many submissions from several people at
// once; it prints latency percentiles and errors and checks that every accepted run ended.
import http from 'node:http';
import autocannon from 'autocannon';
import request from 'supertest';
import type { Orm } from '../../server/db/orm';
import { Run, User } from '../../server/db/entities';
import { createToken } from '../../server/services/tokens';
import { FINAL_STATUSES } from '../../shared/api/contract';
import { defaultRunSpec, type RunSpec } from '../../shared/spec';
import { signIn } from '../support/auth';

export interface LoadOptions {
  url: string;
  orm: Orm;
  /** Seconds of each runs-list section, and its connections. */
  seconds: number;
  connections: number;
  watchers: number;
  submissions: number;
  people: number;
  /** Longest wait for every accepted run to end. */
  settleSeconds: number;
  log?: (line: string) => void;
}

export interface Latency {
  p50: number;
  p95: number;
  p99: number;
}

export interface LoadReport {
  runsListCookie: Latency & { requestsPerSecond: number; errors: number; non2xx: number };
  runsListToken: Latency & { requestsPerSecond: number; errors: number; non2xx: number };
  /** Cookie p50 over token p50; wanted at most 1.5. */
  cookieOverToken: number;
  watchers: Latency & { opened: number; errors: number; sawEnd: number };
  submissions: Latency & { accepted: number; refused: number; errors: number; finalWithin: number; notFinal: number };
}

interface Person {
  login: string;
  cookie: string;
  csrfToken: string;
  token: string;
}

function percentiles(ms: number[]): Latency {
  const s = [...ms].sort((a, b) => a - b);
  const at = (q: number) => (s.length ? s[Math.min(s.length - 1, Math.floor(q * s.length))] : NaN);
  return { p50: at(0.5), p95: at(0.95), p99: at(0.99) };
}

/** Signs `count` people in through the provider (a session cookie each), makes them researchers and gives each a token. */
async function people(opts: LoadOptions, count: number): Promise<Person[]> {
  const host = new URL(opts.url).hostname;
  const stamp = Date.now().toString(36);
  const out: Person[] = [];
  for (let k = 0; k < count; k++) {
    const login = `load-${stamp}-${k}`;
    const agent = request.agent(opts.url);
    const { csrfToken } = await signIn(agent, login);
    const jar = (agent as unknown as { jar: { getCookies(a: object): { toValueString(): string } } }).jar;
    const cookie = jar.getCookies({ domain: host, path: '/', secure: false, script: false }).toValueString();
    const em = opts.orm.em.fork();
    const user = await em.findOneOrFail(User, { login });
    user.role = 'researcher'; // room for several runs at once; a student's quota would refuse most
    await em.flush();
    const { secret } = await createToken(em, user, { name: 'load', expiresInDays: 1 });
    out.push({ login, cookie, csrfToken, token: secret });
  }
  return out;
}

async function cannon(opts: LoadOptions, headers: Record<string, string>) {
  // Every answer's time is kept: autocannon's own summary has no 95th percentile (97.5th is its nearest).
  const times: number[] = [];
  const r = await new Promise<autocannon.Result>((resolve, reject) => {
    const instance = autocannon({ url: `${opts.url}/api/runs?limit=20`, connections: opts.connections, duration: opts.seconds, headers }, (err, result) => (err ? reject(err) : resolve(result)));
    instance.on('response', (_client, _status, _bytes, ms) => times.push(ms));
  });
  return {
    ...percentiles(times),
    requestsPerSecond: r.requests.average,
    errors: r.errors + r.timeouts,
    non2xx: r.non2xx,
  };
}

const tinySpec = (seed: number): RunSpec => {
  const base = defaultRunSpec();
  return { ...base, seed, model: { ...base.model, n: 64 } as RunSpec['model'], duration_Myr: 10 };
};

function post(url: string, token: string, body: unknown): Promise<{ status: number; json: any }> {
  return new Promise((resolve, reject) => {
    const data = JSON.stringify(body);
    const req = http.request(url, { method: 'POST', headers: { Authorization: `Bearer ${token}`, 'Content-Type': 'application/json' } }, (res) => {
      let text = '';
      res.setEncoding('utf8');
      res.on('data', (c) => (text += c));
      res.on('end', () => resolve({ status: res.statusCode!, json: text ? JSON.parse(text) : null }));
    });
    req.on('error', reject);
    req.end(data);
  });
}

/** Opens one event stream; resolves with the time to its first event and whether it saw an end. */
function watch(url: string, token: string, runId: string, limitMs: number): Promise<{ firstMs: number | null; sawEnd: boolean; error: boolean }> {
  const t0 = performance.now();
  return new Promise((resolve) => {
    let firstMs: number | null = null;
    let text = '';
    const req = http.get(`${url}/api/runs/${runId}/events`, { headers: { Authorization: `Bearer ${token}` } }, (res) => {
      if (res.statusCode !== 200) return (res.resume(), resolve({ firstMs: null, sawEnd: false, error: true }));
      res.setEncoding('utf8');
      res.on('data', (c) => {
        firstMs ??= performance.now() - t0;
        text += c;
      });
      // 'close' comes after 'end', and also when the limit cuts the stream short (no 'end' then).
      res.on('close', () => (clearTimeout(limit), resolve({ firstMs, sawEnd: /event: end/.test(text), error: !res.complete })));
    });
    req.on('error', () => (clearTimeout(limit), resolve({ firstMs, sawEnd: false, error: true })));
    const limit = setTimeout(() => req.destroy(), limitMs);
  });
}

async function waitFinal(opts: LoadOptions, ids: string[]): Promise<number> {
  const deadline = Date.now() + opts.settleSeconds * 1000;
  for (;;) {
    const open = await opts.orm.em.fork().count(Run, { id: { $in: ids }, status: { $nin: [...FINAL_STATUSES] } });
    if (open === 0 || Date.now() > deadline) return open;
    await new Promise((r) => setTimeout(r, 250));
  }
}

export async function runLoad(opts: LoadOptions): Promise<LoadReport> {
  const log = opts.log ?? (() => undefined);
  log(`[load] signing in ${opts.people} people`);
  const crowd = await people(opts, opts.people);
  const [first] = crowd;

  log(`[load] runs list: ${opts.connections} connections x ${opts.seconds} s with a session cookie`);
  const runsListCookie = await cannon(opts, { Cookie: first.cookie });
  log(`[load]   p50 ${runsListCookie.p50} ms, ${runsListCookie.requestsPerSecond} req/s, ${runsListCookie.non2xx} non-2xx`);
  log(`[load] runs list: ${opts.connections} connections x ${opts.seconds} s with an API token`);
  const runsListToken = await cannon(opts, { Authorization: `Bearer ${first.token}` });
  log(`[load]   p50 ${runsListToken.p50} ms, ${runsListToken.requestsPerSecond} req/s, ${runsListToken.non2xx} non-2xx`);

  // Watchers: spread over a few runs that take a moment, each watched until it ends.
  log(`[load] ${opts.watchers} event-stream watchers`);
  const watched: { id: string; token: string }[] = [];
  for (let k = 0; k < Math.min(4, crowd.length); k++) {
    const res = await post(`${opts.url}/api/runs`, crowd[k].token, { name: `watched ${k}`, spec: { ...tinySpec(k + 1), duration_Myr: 50 } });
    if (res.status !== 201) throw new Error(`a run to watch was refused: ${res.status} ${JSON.stringify(res.json)}`);
    watched.push({ id: res.json.runs[0].id, token: crowd[k].token });
  }
  // Each run is watched by its owner, as many times over as there are watchers.
  const streams = await Promise.all(
    Array.from({ length: opts.watchers }, (_, k) => watch(opts.url, watched[k % watched.length].token, watched[k % watched.length].id, opts.settleSeconds * 1000)),
  );
  const opened = streams.filter((s) => s.firstMs !== null);
  const watchers = {
    ...percentiles(opened.map((s) => s.firstMs!)),
    opened: opened.length,
    errors: streams.filter((s) => s.error).length,
    sawEnd: streams.filter((s) => s.sawEnd).length,
  };

  log(`[load] ${opts.submissions} submissions at once from ${crowd.length} people`);
  const sent = await Promise.all(
    Array.from({ length: opts.submissions }, async (_, k) => {
      const t0 = performance.now();
      try {
        const res = await post(`${opts.url}/api/runs`, crowd[k % crowd.length].token, { name: `load ${k}`, spec: tinySpec(100 + k) });
        return { ms: performance.now() - t0, status: res.status, id: res.status === 201 ? (res.json.runs[0].id as string) : null };
      } catch {
        return { ms: performance.now() - t0, status: 0, id: null };
      }
    }),
  );
  const accepted = sent.map((s) => s.id).filter((id): id is string => id !== null);
  log(`[load] waiting up to ${opts.settleSeconds} s for ${accepted.length + watched.length} accepted runs to end`);
  const notFinal = await waitFinal(opts, [...accepted, ...watched.map((w) => w.id)]);
  return {
    runsListCookie,
    runsListToken,
    cookieOverToken: runsListCookie.p50 / Math.max(runsListToken.p50, 1e-9),
    watchers,
    submissions: {
      ...percentiles(sent.map((s) => s.ms)),
      accepted: accepted.length,
      refused: sent.filter((s) => s.status >= 400 && s.status < 500).length,
      errors: sent.filter((s) => s.status === 0 || s.status >= 500).length,
      finalWithin: accepted.length + watched.length - notFinal,
      notFinal,
    },
  };
}

export function formatReport(r: LoadReport): string {
  const ms = (v: number) => (Number.isFinite(v) ? `${v.toFixed(0)} ms` : 'n/a');
  const row = (name: string, l: Latency, rest: string) => `${name.padEnd(28)} ${ms(l.p50).padStart(8)} ${ms(l.p95).padStart(8)} ${ms(l.p99).padStart(8)}   ${rest}`;
  return [
    `${'section'.padEnd(28)} ${'p50'.padStart(8)} ${'p95'.padStart(8)} ${'p99'.padStart(8)}   other`,
    row('runs list, session cookie', r.runsListCookie, `${r.runsListCookie.requestsPerSecond.toFixed(0)} req/s, ${r.runsListCookie.errors} errors, ${r.runsListCookie.non2xx} non-2xx`),
    row('runs list, API token', r.runsListToken, `${r.runsListToken.requestsPerSecond.toFixed(0)} req/s, ${r.runsListToken.errors} errors, ${r.runsListToken.non2xx} non-2xx`),
    row('event streams (first event)', r.watchers, `${r.watchers.opened} opened, ${r.watchers.sawEnd} saw the end, ${r.watchers.errors} errors`),
    row('submissions', r.submissions, `${r.submissions.accepted} accepted, ${r.submissions.refused} refused, ${r.submissions.errors} errors; ${r.submissions.finalWithin} runs final, ${r.submissions.notFinal} not`),
    `cookie p50 / token p50 = ${r.cookieOverToken.toFixed(2)} (wanted at most 1.5)`,
  ].join('\n');
}
