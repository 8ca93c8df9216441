// A scripted API for component tests: each route answers from a handler, and every call
// is kept so tests can check method, headers and body.

export interface Call {
  method: string;
  path: string;
  headers: Record<string, string>;
  body: unknown;
}

type Answer = { status?: number; body?: unknown; bytes?: Uint8Array };
type Handler = (call: Call) => Answer | Promise<Answer>;

export function mockApi(routes: Record<string, Handler | Answer>): Call[] {
  const calls: Call[] = [];
  global.fetch = jest.fn(async (input: RequestInfo | URL, init?: RequestInit) => {
    const url = new URL(String(input), 'http://infall.test');
    const method = (init?.method ?? 'GET').toUpperCase();
    const call: Call = {
      method,
      path: url.pathname + url.search,
      headers: (init?.headers ?? {}) as Record<string, string>,
      // A multipart upload is kept as its FormData.
      body: init?.body instanceof FormData ? init.body : init?.body ? JSON.parse(String(init.body)) : undefined,
    };
    calls.push(call);
    const key = Object.keys(routes).find((k) => k === `${method} ${url.pathname}` || k === `${method} ${url.pathname}${url.search}`);
    const route = key ? routes[key] : undefined;
    const answer: Answer = route === undefined ? { status: 404, body: { error: { code: 'NOT_FOUND', message: `no mock for ${method} ${call.path}` } } } : typeof route === 'function' ? await route(call) : route;
    return fakeResponse(answer.status ?? 200, answer.bytes ?? (answer.body === undefined ? '' : JSON.stringify(answer.body)));
  }) as unknown as typeof fetch;
  return calls;
}

// jsdom has no fetch Response; this is the part of one the app reads.
function fakeResponse(status: number, payload: string | Uint8Array) {
  const text = typeof payload === 'string' ? payload : '';
  const res = {
    status,
    ok: status >= 200 && status < 300,
    text: async () => text,
    json: async () => JSON.parse(text),
    arrayBuffer: async () => (typeof payload === 'string' ? new TextEncoder().encode(payload) : payload).slice().buffer,
    clone: () => fakeResponse(status, payload),
  };
  return res;
}

/** A server-sent event source the test drives by hand. */
export class FakeEventSource {
  static instances: FakeEventSource[] = [];
  onopen: (() => void) | null = null;
  onerror: (() => void) | null = null;
  closed = false;
  private listeners = new Map<string, ((ev: MessageEvent) => void)[]>();
  constructor(readonly url: string) {
    FakeEventSource.instances.push(this);
  }
  addEventListener(name: string, fn: (ev: MessageEvent) => void) {
    this.listeners.set(name, [...(this.listeners.get(name) ?? []), fn]);
  }
  close() {
    this.closed = true;
  }
  emit(name: string, data: unknown) {
    for (const fn of this.listeners.get(name) ?? []) fn(new MessageEvent(name, { data: JSON.stringify(data) }));
  }
}
