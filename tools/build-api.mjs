// Bundles the API, the job worker, the worker threads' entry and the local fake mail server into dist/ with esbuild.
// npm packages stay external: they are installed beside the bundle in node_modules.
import { build } from 'esbuild';
import { existsSync } from 'node:fs';

const entryPoints = {
  main: 'apps/api/src/main.ts',
  'fake-mail': 'tools/fake-mail.ts',
  'station-simulator': 'tools/station-simulator.ts',
  // The worker threads' entry (apps/api/src/workers/pool.ts loads it from beside main.mjs).
  'pool-worker': 'apps/api/src/workers/pool-worker.ts',
};
if (existsSync('apps/api/src/worker.ts')) entryPoints.worker = 'apps/api/src/worker.ts';

await build({
  entryPoints,
  outdir: 'dist/api',
  outExtension: { '.js': '.mjs' },
  bundle: true,
  platform: 'node',
  format: 'esm',
  target: 'node20',
  packages: 'external',
  sourcemap: true,
  tsconfig: 'tsconfig.json',
  logLevel: 'warning',
});
console.log('API bundled into dist/api');
