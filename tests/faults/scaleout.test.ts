// Two server processes and two worker processes on one PostgreSQL and one Redis: they share the
// queue and the event fan-out, no run is computed twice and every watcher hears every progress
// event and every end, whichever server it is connected to.
import http from 'node:http';
import net from 'node:net';
import { openTestStack, uniqueLogin, type TestStack } from '../support/stack';
import { startProcess, killAll, type Child } from '../support/processes';
import { User, Run } from '../../server/db/entities';
import { createToken } from '../../server/services/tokens';
import { defaultRunSpec, type RunSpec } from '../../shared/spec';

jest.setTimeout(180_000);

let stack: TestStack;
let secret: string;
const servers: { child: Child; port: number }[] = [];

function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const s = net.createServer().listen(0, '127.0.0.1', () => {
      const { port } = s.address() as net.AddressInfo;
      s.close(() => resolve(port));
    });
  });
}

function request(port: number, method: string, path: string, body?: unknown): Promise<{ status: number; json: any }> {
  return new Promise((resolve, reject) => {
    const data = body === undefined ? undefined : JSON.stringify(body);
    const req = http.request(
      { host: '127.0.0.1', port, method, path, headers: { Authorization: `Bearer ${secret}`, ...(data ? { 'Content-Type': 'application/json' } : {}) } },
      (res) => {
        let text = '';
        res.setEncoding('utf8');
        res.on('data', (c) => (text += c));
        res.on('end', () => resolve({ status: res.statusCode!, json: text ? JSON.parse(text) : null }));
      },
    );
    req.on('error', reject);
    req.end(data);
  });
}

/** Resolves with the status of the stream's `end` event (null if it closed without one) and the progress it carried (step, percent). */
function watchStream(port: number, runId: string): Promise<{ end: string | null; progress: [number, number][] }> {
  return new Promise((resolve, reject) => {
    http
      .get({ host: '127.0.0.1', port, path: `/api/runs/${runId}/events`, headers: { Authorization: `Bearer ${secret}` } }, (res) => {
        let text = '';
        res.setEncoding('utf8');
        res.on('data', (c) => (text += c));
        res.on('end', () => {
          const progress = [...text.matchAll(/^id: (\d+)\nevent: progress\ndata: (.*)$/gm)].map((m): [number, number] => [Number(m[1]), JSON.parse(m[2]).percent]);
          resolve({ end: /event: end\ndata: \{"status":"(\w+)"/.exec(text)?.[1] ?? null, progress });
        });
      })
      .on('error', reject);
  });
}
const watchEnd = (port: number, runId: string) => watchStream(port, runId).then((w) => w.end);

beforeAll(async () => {
  stack = await openTestStack();
  const em = stack.orm.em.fork();
  const login = uniqueLogin('scale');
  const user = em.create(User, { providerId: login, login, name: 'Scale Test', role: 'admin' });
  await em.flush();
  secret = (await createToken(em, user, { name: 'scale', expiresInDays: 1 })).secret;
  for (let k = 0; k < 2; k++) {
    const port = await freePort();
    const child = startProcess('server/index.ts', { INFALL_PORT: String(port), INFALL_WEB_DIR: '/nonexistent' });
    await child.waitFor(/listening on/);
    servers.push({ child, port });
  }
});

afterAll(async () => {
  await killAll();
  await stack.queue.obliterate({ force: true }).catch(() => undefined);
  await stack.close();
});

test('runs submitted to one server are shared by two workers, computed once each, and every watcher on either server hears each progress event and each end', async () => {
  const [a, b] = servers;
  const base = defaultRunSpec();
  const spec = (seed: number): RunSpec => ({ ...base, seed, model: { ...base.model, n: 300 } as RunSpec['model'], duration_Myr: 40 });

  // With no worker yet, a run cancelled on server A ends at once; a watcher on server B hears it through Redis.
  const cancelled = await request(a.port, 'POST', '/api/runs', { name: 'to cancel', spec: spec(100) });
  expect(cancelled.status).toBe(201);
  const cancelledId: string = cancelled.json.runs[0].id;
  const heardOnB = watchEnd(b.port, cancelledId);
  await new Promise((r) => setTimeout(r, 500)); // B's stream is open and subscribed
  expect((await request(a.port, 'POST', `/api/runs/${cancelledId}/cancel`)).status).toBe(202);
  expect(await heardOnB).toBe('cancelled');

  const ids: string[] = [];
  for (let k = 0; k < 12; k++) {
    const res = await request(k % 2 ? b.port : a.port, 'POST', '/api/runs', { name: `shared ${k}`, spec: spec(k + 1) });
    expect(res.status).toBe(201);
    ids.push(res.json.runs[0].id);
  }
  // Every run watched on both servers before any worker starts, so no event can come before its watcher.
  const streams = ids.map((id) => Promise.all([watchStream(a.port, id), watchStream(b.port, id)]));
  await new Promise((r) => setTimeout(r, 500));
  const workers = [0, 1].map(() => startProcess('worker/index.ts', { INFALL_WORKER_THREADS: '1' }));

  const heard = await Promise.all(streams);
  expect(heard.flatMap((pair) => pair.map((w) => w.end))).toEqual(ids.flatMap(() => ['finished', 'finished']));
  // No event lost: both servers carried each run's progress, the same steps in the same order, up to 100 %.
  for (const [onA, onB] of heard) {
    expect(onA.progress.length).toBeGreaterThan(1);
    expect(onB.progress).toEqual(onA.progress);
    expect(onA.progress.every(([step], k) => k === 0 || step > onA.progress[k - 1][0])).toBe(true);
    expect(onA.progress[onA.progress.length - 1][1]).toBe(100);
  }
  const rows = await stack.orm.em.fork().find(Run, { id: { $in: ids } });
  expect(rows.every((r) => r.status === 'finished')).toBe(true);
  // Each job was started once: no run was computed by both workers.
  for (const id of ids) expect((await stack.queue.getJob(id))!.attemptsStarted).toBe(1);
  // Both workers took part (the queue, not one process, spread the work); each names itself host:pid.
  const processedBy = await Promise.all(ids.map(async (id) => (await stack.queue.getJob(id))!.processedBy));
  expect(new Set(processedBy)).toEqual(new Set(workers.map((w) => expect.stringMatching(new RegExp(`:${w.proc.pid}$`)))));
});
