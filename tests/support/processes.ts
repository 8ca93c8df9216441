// Real processes of the stack for fault tests: workers and servers as child processes of
// the test, PostgreSQL and Redis stopped and started through services.sh. Every child is
// killed by killAll(), so a failed test leaves nothing running.
import { spawn, execFileSync, type ChildProcess } from 'node:child_process';
import { readFileSync } from 'node:fs';
import path from 'node:path';

const root = path.resolve(__dirname, '../..');

export interface Child {
  proc: ChildProcess;
  /** Everything it printed so far. */
  output(): string;
  /** Resolves when its output matches. */
  waitFor(pattern: RegExp, ms?: number): Promise<void>;
}

const children = new Set<ChildProcess>();

export function startProcess(entry: 'worker/index.ts' | 'server/index.ts', env: Record<string, string> = {}): Child {
  const proc = spawn(process.execPath, ['--import', 'tsx', entry], { cwd: root, env: { ...process.env, ...env }, stdio: ['ignore', 'pipe', 'pipe'] });
  children.add(proc);
  proc.on('exit', () => children.delete(proc));
  let out = '';
  const waiters: { re: RegExp; resolve: () => void }[] = [];
  const onData = (d: Buffer) => {
    out += d.toString();
    for (const w of [...waiters]) if (w.re.test(out)) (waiters.splice(waiters.indexOf(w), 1), w.resolve());
  };
  proc.stdout!.on('data', onData);
  proc.stderr!.on('data', onData);
  return {
    proc,
    output: () => out,
    waitFor: (re, ms = 60_000) =>
      new Promise<void>((resolve, reject) => {
        if (re.test(out)) return resolve();
        const t = setTimeout(() => reject(new Error(`${entry} did not print ${re} within ${ms} ms; it printed:\n${out.slice(-3000)}`)), ms);
        waiters.push({ re, resolve: () => (clearTimeout(t), resolve()) });
      }),
  };
}

/** kill -9, and waits until it is gone. */
export async function killHard(child: Child): Promise<void> {
  if (child.proc.exitCode !== null || child.proc.signalCode !== null) return;
  const gone = new Promise((r) => child.proc.once('exit', r));
  child.proc.kill('SIGKILL');
  await gone;
}

export async function killAll(): Promise<void> {
  await Promise.all([...children].map((proc) => new Promise((r) => (proc.once('exit', r), proc.kill('SIGKILL')))));
}

function services(command: string): void {
  execFileSync('bash', ['-c', `source server/scripts/services.sh && ${command}`], { cwd: root, stdio: 'inherit', timeout: 90_000 });
}

/** The test run's PostgreSQL folder: tests/run.sh keeps it under INFALL_DATA_DIR; INFALL_TEST_PG_DIR overrides. */
function pgDir(): string {
  const dir = process.env.INFALL_TEST_PG_DIR ?? (process.env.INFALL_DATA_DIR && path.join(process.env.INFALL_DATA_DIR, 'pg'));
  if (!dir) throw new Error('fault tests need INFALL_TEST_PG_DIR or INFALL_DATA_DIR to stop and start PostgreSQL');
  return dir;
}

function redisDir(): string {
  const dir = process.env.INFALL_TEST_REDIS_DIR ?? (process.env.INFALL_DATA_DIR && path.join(process.env.INFALL_DATA_DIR, 'redis'));
  if (!dir) throw new Error('fault tests need INFALL_TEST_REDIS_DIR or INFALL_DATA_DIR to restart Redis');
  return dir;
}

/** The test cluster's postmaster (first line of postmaster.pid) and its backends. */
function pgProcesses(): number[] {
  const postmaster = Number(readFileSync(path.join(pgDir(), 'data', 'postmaster.pid'), 'utf8').split('\n')[0]);
  const children = execFileSync('ps', ['-o', 'pid=', '--ppid', String(postmaster)], { encoding: 'utf8' }).split('\n').map(Number).filter((n) => n > 0);
  return [postmaster, ...children];
}

export const postgres = {
  stop: () => services(`pg_stop '${pgDir()}'`),
  start: () => services(`pg_start '${pgDir()}' ${process.env.INFALL_PG_PORT}`),
  /** SIGSTOP: the server stops answering mid-request while its connections stay open. */
  freeze: () => pgProcesses().forEach((pid) => process.kill(pid, 'SIGSTOP')),
  thaw: () => pgProcesses().forEach((pid) => process.kill(pid, 'SIGCONT')),
};

export const redis = {
  stop: () => services(`redis_stop ${process.env.INFALL_REDIS_PORT}`),
  start: () => services(`redis_start '${redisDir()}' ${process.env.INFALL_REDIS_PORT}`),
};
