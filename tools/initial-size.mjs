// The web app's first download: every file index.html loads before any section (stylesheet,
// main script, the chunks it preloads), gzipped as a server would send them. Prints the figure
// and fails above the limit (issue: at most 150 kB). Run after `ng build`: `node tools/initial-size.mjs`.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';

const LIMIT_KB = 150;
const dir = process.argv[2] ?? 'dist/web/browser';
const html = readFileSync(join(dir, 'index.html'), 'utf8');
const files = [...new Set([...html.matchAll(/(?:src|href)="([^"]+\.(?:js|css))"/g)].map((m) => m[1]))];
let total = 0;
for (const file of files) {
  const bytes = gzipSync(readFileSync(join(dir, file)), { level: 9 }).length;
  total += bytes;
}
const kb = total / 1024;
console.log(`First download: ${files.length} files, ${kb.toFixed(1)} kB gzipped (limit ${LIMIT_KB} kB)`);
if (kb > LIMIT_KB) {
  console.error(
    `The first download is over ${LIMIT_KB} kB: keep zod, luxon and the sections out of the shell (import plain contract modules, lazy routes)`,
  );
  process.exit(1);
}
