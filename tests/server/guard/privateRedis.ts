// A Redis of this test file's own, which the test may stop and start: imported first,
// so the server's config (read at import) points the queue at it.
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import net from 'node:net';

export const PRIVATE_REDIS_PORT = 55544 + Number(process.env.INFALL_TEST_AUTH_PORT_SHIFT ?? 0);
process.env.INFALL_REDIS_PORT = String(PRIVATE_REDIS_PORT);

const dir = mkdtempSync(path.join(tmpdir(), 'infall-guard-redis-'));
let child: ChildProcess | null = null;

const answers = () =>
  new Promise<boolean>((resolve) => {
    const sock = net.connect(PRIVATE_REDIS_PORT, '127.0.0.1', () => {
      sock.end();
      resolve(true);
    });
    sock.on('error', () => resolve(false));
  });

export async function startRedis(): Promise<void> {
  child = spawn('redis-server', ['--port', String(PRIVATE_REDIS_PORT), '--bind', '127.0.0.1', '--save', '', '--appendonly', 'no', '--dir', dir], { stdio: 'ignore' });
  for (let i = 0; i < 100 && !(await answers()); i++) await new Promise((r) => setTimeout(r, 50));
}

/** Kills the Redis process outright (SIGKILL), as a crash would. */
export async function stopRedis(): Promise<void> {
  const c = child;
  child = null;
  if (!c || c.exitCode !== null) return;
  const gone = new Promise((r) => c.once('exit', r));
  c.kill('SIGKILL');
  await gone;
}
