// A worker thread that fits one galaxy, so a fit of a few seconds never blocks the server's
// event loop. It answers once, with the report or the fitter's refusal, and ends.
import { parentPort, workerData } from 'node:worker_threads';
import { fitGalaxy, FitError, type FitOptions } from '../../shared/galaxy/fit';
import type { RotationCurve } from '../../shared/galaxy/table';

export interface FitJob {
  curve: RotationCurve;
  options: FitOptions;
}

const { curve, options } = workerData as FitJob;
try {
  parentPort!.postMessage({ ok: true, report: fitGalaxy(curve, options) });
} catch (err) {
  parentPort!.postMessage({ ok: false, refused: err instanceof FitError, message: err instanceof Error ? err.message : String(err) });
}
