// `npm start` supervises its processes: kill -9 of the worker (or the server) brings that one
// process back while PostgreSQL, Redis and the other processes keep running; stopping start.sh
// stops everything it started.
import { spawn, execFileSync, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import http from 'node:http';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';

jest.setTimeout(240_000);

const root = path.resolve(__dirname, '../..');
let dataDir: string;
let start: ChildProcess | null = null;
let output = '';
const ports: Record<string, number> = {};

function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const s = net.createServer().listen(0, '127.0.0.1', () => {
      const { port } = s.address() as net.AddressInfo;
      s.close(() => resolve(port));
    });
  });
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function until(what: string, ok: () => boolean | Promise<boolean>, ms: number): Promise<void> {
  for (const t0 = Date.now(); !(await ok()); await sleep(250)) {
    if (Date.now() - t0 > ms) throw new Error(`${what} not within ${ms} ms; start.sh printed:\n${output.slice(-4000)}`);
  }
}

/** The processes under `pid`, at any depth. */
function tree(pid: number): { pid: number; args: string }[] {
  const rows = execFileSync('ps', ['-e', '-o', 'pid=,ppid=,args='], { encoding: 'utf8' })
    .split('\n')
    .map((l) => /^\s*(\d+)\s+(\d+)\s+(.*)$/.exec(l))
    .filter((m): m is RegExpExecArray => m !== null)
    .map((m) => ({ pid: Number(m[1]), ppid: Number(m[2]), args: m[3] }));
  const under = new Set([pid]);
  for (let grew = true; grew; ) {
    grew = false;
    for (const r of rows) if (under.has(r.ppid) && !under.has(r.pid)) (under.add(r.pid), (grew = true));
  }
  return rows.filter((r) => under.has(r.pid) && r.pid !== pid);
}

/** The node processes under `pid` running `entry`. */
const descendants = (pid: number, entry: string): number[] => tree(pid).filter((r) => r.args.startsWith(process.execPath) || r.args.startsWith('node')).filter((r) => r.args.includes(entry)).map((r) => r.pid);

const answers = (port: number, p = '/api/health') =>
  new Promise<boolean>((resolve) => {
    http.get({ host: '127.0.0.1', port, path: p, timeout: 3000 }, (res) => (res.resume(), resolve(true))).on('error', () => resolve(false));
  });

const redisUp = () => {
  try {
    return execFileSync('redis-cli', ['-h', '127.0.0.1', '-p', String(ports.redis), 'ping'], { encoding: 'utf8', stdio: ['ignore', 'pipe', 'ignore'] }).trim() === 'PONG';
  } catch {
    return false;
  }
};
const pgUp = () => fs.existsSync(path.join(dataDir, 'pg', 'data', 'postmaster.pid'));

beforeAll(async () => {
  dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'infall-supervise-'));
  for (const k of ['port', 'pg', 'redis', 'oauth', 'smtp', 'outbox']) ports[k] = await freePort();
  // A web export newer than every source, so start.sh does not build one.
  const web = path.join(dataDir, 'web');
  fs.mkdirSync(web);
  fs.writeFileSync(path.join(web, 'index.html'), '<!doctype html><title>Infall</title>');
});

afterAll(async () => {
  if (start && start.exitCode === null) {
    process.kill(-start.pid!, 'SIGKILL');
  }
  try {
    execFileSync('bash', ['-c', `source server/scripts/services.sh && redis_stop ${ports.redis}; pg_stop '${dataDir}/pg'`], { cwd: root, timeout: 60_000 });
  } catch {
    // already stopped
  }
  fs.rmSync(dataDir, { recursive: true, force: true });
});

test('kill -9 of the worker and of the server: each comes back, the rest keeps running; a stop ends everything', async () => {
  start = spawn('bash', ['server/scripts/start.sh'], {
    cwd: root,
    detached: true, // its own process group, so a failed test can end all of it
    env: {
      ...process.env,
      INFALL_DATA_DIR: dataDir,
      INFALL_WEB_DIR: path.join(dataDir, 'web'),
      INFALL_PORT: String(ports.port),
      INFALL_PG_PORT: String(ports.pg),
      INFALL_REDIS_PORT: String(ports.redis),
      INFALL_OAUTH_PORT: String(ports.oauth),
      INFALL_SMTP_PORT: String(ports.smtp),
      INFALL_OUTBOX_PORT: String(ports.outbox),
      INFALL_QUEUE: `supervise-${ports.port}`,
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  start.stdout!.on('data', (d) => (output += d));
  start.stderr!.on('data', (d) => (output += d));
  const pid = start.pid!;
  await until('the stack is up', () => /Infall is running at/.test(output), 180_000);
  await until('the worker is taking runs', () => /\[worker\] taking runs/.test(output), 60_000);

  const [worker] = descendants(pid, 'worker/index.ts');
  const [server] = descendants(pid, 'server/index.ts');
  expect(worker).toBeGreaterThan(0);
  process.kill(worker, 'SIGKILL');
  await until('a new worker', () => descendants(pid, 'worker/index.ts').some((p) => p !== worker), 30_000);
  expect(output).toMatch(/worker ended \(exit 137\); starting it again/);
  // Nothing else went down with it.
  expect(start.exitCode).toBeNull();
  expect(descendants(pid, 'server/index.ts')).toEqual([server]);
  expect(await answers(ports.port)).toBe(true);
  expect(redisUp()).toBe(true);
  expect(pgUp()).toBe(true);

  process.kill(server, 'SIGKILL');
  await until('the server answers again', async () => descendants(pid, 'server/index.ts').some((p) => p !== server) && (await answers(ports.port)), 60_000);
  expect(redisUp()).toBe(true);

  // Ctrl-C's TERM: every process, PostgreSQL and Redis it started are stopped.
  const stack = tree(pid);
  expect(stack.length).toBeGreaterThanOrEqual(6); // three supervisors and their three processes
  const ended = new Promise((r) => start!.once('exit', r));
  process.kill(pid, 'SIGTERM');
  await ended;
  const alive = (p: number) => {
    try {
      process.kill(p, 0);
      return true;
    } catch {
      return false;
    }
  };
  // Given a moment: a process's own helpers (esbuild under tsx) leave just after it.
  await until('every process gone', () => stack.every((r) => !alive(r.pid)), 10_000).catch(() => undefined);
  expect(stack.filter((r) => alive(r.pid)).map((r) => r.args)).toEqual([]);
  expect(await answers(ports.port)).toBe(false);
  expect(redisUp()).toBe(false);
  expect(pgUp()).toBe(false);
});
