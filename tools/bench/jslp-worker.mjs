// Solves one LP with javascript-lp-solver inside a worker thread, so the benchmark can end it
// when its time limit passes (the solver has no limit of its own on the LP phase).
import { parentPort, workerData } from 'node:worker_threads';
import solver from 'javascript-lp-solver';

const t0 = performance.now();
const result = solver.Solve(workerData.model);
parentPort.postMessage({
  ms: performance.now() - t0,
  feasible: result.feasible,
  bounded: result.bounded,
  result: result.result,
});
