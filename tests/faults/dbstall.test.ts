// PostgreSQL that stops answering mid-request (its processes frozen, connections left open),
// not one that refuses connections: a request in flight answers 503 naming the database, health
// answers 503 within its deadline (naming parts needs an admin, whom only the database can
// recognise), the server stays up, and it serves again once PostgreSQL is back.
import http from 'node:http';
import net from 'node:net';
import { openTestStack, uniqueLogin, type TestStack } from '../support/stack';
import { startProcess, killAll, postgres } from '../support/processes';
import { User } from '../../server/db/entities';
import { createToken } from '../../server/services/tokens';

jest.setTimeout(120_000);

// Short, so the test waits little; the default is in README ("Limits and safety").
const QUERY_TIMEOUT_MS = 3000;

let stack: TestStack;
let frozen = false;

beforeAll(async () => {
  stack = await openTestStack();
});

afterAll(async () => {
  if (frozen) postgres.thaw();
  await killAll();
  await stack.close();
});

function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const s = net.createServer().listen(0, '127.0.0.1', () => {
      const { port } = s.address() as net.AddressInfo;
      s.close(() => resolve(port));
    });
  });
}

/** A GET with its status, body and how long the answer took. */
function get(port: number, path: string, token: string): Promise<{ status: number; body: { status?: string; down?: string[]; error?: { code: string; message: string } }; ms: number }> {
  const t0 = Date.now();
  return new Promise((resolve, reject) => {
    http
      .get({ host: '127.0.0.1', port, path, headers: { Authorization: `Bearer ${token}` } }, (res) => {
        let text = '';
        res.setEncoding('utf8');
        res.on('data', (d: string) => (text += d));
        res.on('end', () => resolve({ status: res.statusCode!, body: JSON.parse(text), ms: Date.now() - t0 }));
      })
      .on('error', reject);
  });
}

test('PostgreSQL frozen mid-request: a request in flight answers 503 naming the database, health 503 within its deadline, the server stays up, and serves again once it is back', async () => {
  const em = stack.orm.em.fork();
  const login = uniqueLogin('dbstall');
  const admin = em.create(User, { providerId: login, login, name: 'Stall Test', role: 'admin' });
  await em.flush();
  const { secret } = await createToken(stack.orm.em.fork(), admin, { name: 'stall', expiresInDays: 1 });
  const port = await freePort();
  const server = startProcess('server/index.ts', { INFALL_PORT: String(port), INFALL_WEB_DIR: '/nonexistent', INFALL_QUERY_TIMEOUT_MS: String(QUERY_TIMEOUT_MS) });
  await server.waitFor(/listening on/);
  // Connections in the server's pool are open before PostgreSQL stops.
  expect((await get(port, '/api/runs', secret)).status).toBe(200);

  postgres.freeze();
  frozen = true;
  try {
    const [runs, health] = await Promise.all([get(port, '/api/runs', secret), get(port, '/api/health', secret)]);
    expect(runs.status).toBe(503);
    expect(runs.body.error).toEqual({ code: 'UNAVAILABLE', message: 'The database is not answering; try again shortly' });
    // Bounds of the contract (answer at all, within the statement and health limits), not speed claims.
    expect(runs.ms).toBeLessThan(QUERY_TIMEOUT_MS * 3);
    expect(health.status).toBe(503);
    expect(health.ms).toBeLessThan(5000);
    expect(server.proc.exitCode).toBeNull();
  } finally {
    postgres.thaw();
    frozen = false;
  }
  // Back: the same server answers from its pool again.
  let status = 0;
  for (let i = 0; i < 40 && status !== 200; i++) {
    status = (await get(port, '/api/runs', secret)).status;
    if (status !== 200) await new Promise((r) => setTimeout(r, 250));
  }
  expect(status).toBe(200);
  expect(server.proc.exitCode).toBeNull();
});
