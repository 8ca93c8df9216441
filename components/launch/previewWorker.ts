// The web worker that computes the new-run form's preview, so drawing particles for the checks
// (a grid solve under field-form MOND, seconds for a large disk) never holds up typing.
import { computePreview, type PreviewAnswer, type PreviewRequest } from './preview';

const scope = self as unknown as { onmessage: ((e: MessageEvent<PreviewRequest>) => void) | null; postMessage(m: PreviewAnswer): void };

// computePreview reports the engine's errors in the preview itself; anything else ends the
// worker, and the form computes in place (hooks/preview.ts).
scope.onmessage = ({ data }) => scope.postMessage({ id: data.id, preview: computePreview(data.spec, data.pair) });
