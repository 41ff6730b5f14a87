import { readFileSync } from 'node:fs';
import { parseScenario } from '../scenario.js';
import { planScenario } from '../plan.js';

// `npm run plan -- FILE`: the plan JSON on standard output; problems on standard error.
async function main(): Promise<number> {
  const file = process.argv[2];
  if (!file) {
    process.stderr.write('usage: npm run plan -- SCENARIO.json\n');
    return 2;
  }
  let json: unknown;
  try {
    json = JSON.parse(readFileSync(file, 'utf8'));
  } catch (error) {
    process.stderr.write(`${file}: cannot read a JSON document: ${(error as Error).message}\n`);
    return 1;
  }
  const parsed = parseScenario(json);
  if (!parsed.ok) {
    process.stderr.write(`${file}: ${parsed.problems.length} problem(s):\n`);
    for (const p of parsed.problems) process.stderr.write(`  ${p.path}: ${p.message}\n`);
    return 1;
  }
  const plan = await planScenario(parsed.scenario);
  process.stdout.write(`${JSON.stringify(plan, null, 2)}\n`);
  return 0;
}

// The exit code is set, not forced: the process ends once standard output has drained, so a
// slow reader (a pipe that takes 64 KB at a time) still gets the whole document.
main().then(
  (code) => {
    process.exitCode = code;
  },
  (error) => {
    process.stderr.write(`plan failed: ${(error as Error).stack ?? error}\n`);
    process.exitCode = 1;
  },
);
