// A worker thread that fits one galaxy or a sample, so a fit of a few seconds never blocks the
// server's event loop. It answers once, with the report or the fitter's refusal, and ends.
import { parentPort, workerData } from 'node:worker_threads';
import { fitGalaxy, fitSample, FitError, type FitOptions, type SampleGalaxy } from '../../shared/galaxy/fit';
import type { RotationCurve } from '../../shared/galaxy/table';

export type FitJob = { curve: RotationCurve; options: FitOptions } | { sample: SampleGalaxy[]; options: FitOptions };

const job = workerData as FitJob;
try {
  parentPort!.postMessage({ ok: true, report: 'sample' in job ? fitSample(job.sample, job.options) : fitGalaxy(job.curve, job.options) });
} catch (err) {
  parentPort!.postMessage({ ok: false, refused: err instanceof FitError, message: err instanceof Error ? err.message : String(err) });
}
