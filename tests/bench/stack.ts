// End to end through a running stack, as a script with a personal API token
// would use it: submit, follow the server-sent events, fetch the snapshots.
import type { RunProgress, RunStatus, RunSummary } from '../../shared/api/contract';
import { decodeSnapshots, SNAPSHOT_WIRE_FORMAT } from '../../shared/api/snapshots';
import type { RunSpec } from '../../shared/spec';
import { bigDiskRun, diskRun } from './specs';

export interface StackTarget {
  /** The server, e.g. http://127.0.0.1:57080 */
  url: string;
  /** A personal API token (infall_...) of the bench user. */
  token: string;
}

export interface EndToEndFigures {
  particles: number;
  steps: number;
  /** From sending the submission to the first progress event on the run's event stream. */
  firstProgressMs: number;
  /** From sending the submission to the end event of a finished run. */
  diskRunSeconds: number;
  runId: string;
  bigDiskParticles: number;
  bigDiskSteps: number;
  /** From sending the submission to the end event of a finished disk-with-bulge tree run. */
  bigDiskRunSeconds: number;
}

export interface SnapshotFigures {
  frames: number;
  particles: number;
  bytes: number;
  bytesPerParticle: number;
}

async function api<T>(t: StackTarget, method: string, path: string, body?: unknown): Promise<T> {
  const res = await fetch(`${t.url}${path}`, {
    method,
    headers: { Authorization: `Bearer ${t.token}`, ...(body ? { 'Content-Type': 'application/json' } : {}) },
    body: body ? JSON.stringify(body) : undefined,
  });
  if (!res.ok) throw new Error(`${method} ${path} answered ${res.status}: ${await res.text()}`);
  return (await res.json()) as T;
}

export async function submit(t: StackTarget, spec: RunSpec): Promise<RunSummary> {
  const { runs } = await api<{ runs: RunSummary[] }>(t, 'POST', '/api/runs', { spec });
  return runs[0];
}

/** Follows a run's event stream to its end, calling back on each progress event; resolves with the final status. */
export async function follow(t: StackTarget, runId: string, onProgress: (p: RunProgress) => void = () => undefined): Promise<RunStatus> {
  const res = await fetch(`${t.url}/api/runs/${runId}/events`, { headers: { Authorization: `Bearer ${t.token}`, Accept: 'text/event-stream' } });
  if (!res.ok || !res.body) throw new Error(`events of ${runId} answered ${res.status}`);
  const decoder = new TextDecoder();
  let buffered = '';
  for await (const chunk of res.body as unknown as AsyncIterable<Uint8Array>) {
    buffered += decoder.decode(chunk, { stream: true });
    let cut: number;
    while ((cut = buffered.indexOf('\n\n')) >= 0) {
      const message = buffered.slice(0, cut);
      buffered = buffered.slice(cut + 2);
      const event = /^event: (.*)$/m.exec(message)?.[1];
      const data = /^data: (.*)$/m.exec(message)?.[1];
      if (!event || data === undefined) continue; // heartbeat comments
      if (event === 'progress') onProgress(JSON.parse(data) as RunProgress);
      if (event === 'end') return (JSON.parse(data) as { status: RunStatus }).status;
    }
  }
  throw new Error(`the event stream of ${runId} closed before its end event`);
}

/** Submits a spec and waits for it to finish; throws unless it finished. */
export async function runToEnd(t: StackTarget, spec: RunSpec): Promise<string> {
  const run = await submit(t, spec);
  const status = await follow(t, run.id);
  if (status !== 'finished') throw new Error(`bench run ${run.id} ended ${status}`);
  return run.id;
}

/** Seconds from sending a submission to the end event of the finished run. */
async function timeRun(t: StackTarget, spec: RunSpec): Promise<number> {
  const sent = performance.now();
  await runToEnd(t, spec);
  return (performance.now() - sent) / 1000;
}

export async function benchEndToEnd(t: StackTarget, { particles = 2_000, steps = 1_000, bigParticles = 8_000, bigSteps = 1_000 } = {}): Promise<EndToEndFigures> {
  // One small run first: the worker's thread and the engine's modules load once, and that is not what is measured.
  await runToEnd(t, diskRun(200, 10));
  const sent = performance.now();
  const run = await submit(t, diskRun(particles, steps));
  let firstProgressMs = NaN;
  const status = await follow(t, run.id, () => {
    if (Number.isNaN(firstProgressMs)) firstProgressMs = performance.now() - sent;
  });
  const diskRunSeconds = (performance.now() - sent) / 1000;
  if (status !== 'finished') throw new Error(`the disk run ended ${status}`);
  const bigDiskRunSeconds = await timeRun(t, bigDiskRun(bigParticles, bigSteps));
  return { particles, steps, firstProgressMs, diskRunSeconds, runId: run.id, bigDiskParticles: bigParticles, bigDiskSteps: bigSteps, bigDiskRunSeconds };
}

/** Bytes on the wire per particle per frame of GET /api/runs/:id/snapshots. */
export async function benchSnapshots(t: StackTarget, runId: string): Promise<SnapshotFigures> {
  const res = await fetch(`${t.url}/api/runs/${runId}/snapshots?format=${SNAPSHOT_WIRE_FORMAT}`, { headers: { Authorization: `Bearer ${t.token}`, 'Accept-Encoding': 'identity' } });
  if (!res.ok) throw new Error(`snapshots of ${runId} answered ${res.status}`);
  const bytes = new Uint8Array(await res.arrayBuffer());
  const { frames } = decodeSnapshots(bytes);
  const particles = frames.length ? frames[0].positions.length / 3 : 0;
  return { frames: frames.length, particles, bytes: bytes.byteLength, bytesPerParticle: bytes.byteLength / (frames.length * particles) };
}
