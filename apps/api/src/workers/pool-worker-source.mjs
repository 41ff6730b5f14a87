// Runs the pool's worker from its TypeScript source (tests, `npm run dev:api`): the bundle in
// dist/ uses dist/api/pool-worker.mjs instead. tsx compiles the source inside this thread.
import { register } from 'tsx/esm/api';

register();
const worker = await import('./pool-worker.ts');
export default worker.default;
