// What the browser check of the direct-sum kernel loads: the engine's direct sum and its switch,
// bundled for a page the way the web app takes them (no Node APIs).
export { directFieldRange, directPotentialRange } from '../../../shared/engine/solvers/direct';
export { directKernelInUse, setDirectKernel } from '../../../shared/engine/solvers/directWasm';
