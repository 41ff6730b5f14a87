import { parseScenario, loadSolver, prepareProblem, solveLowerBound, initialAssignment, plugMapOf } from '@nightyard/scheduling';
import { AssignedModel } from './src/local-search.ts';
import { generateDepot } from '/work/main/tools/bench/generate.ts';
const solver = await loadSolver();
const n = Number(process.argv[2] ?? 50);
const parsed = parseScenario(generateDepot({ buses: n, seed: n }));
if (!parsed.ok) throw 0;
let t = performance.now();
const problem = prepareProblem(parsed.scenario);
console.log('prep', performance.now() - t); t = performance.now();
const lb = solveLowerBound(problem, solver);
console.log('lb', performance.now() - t, lb.ms); t = performance.now();
const hints = { energy: new Float64Array(problem.stays.length), weight: new Float64Array(problem.T), power: lb.power, centre: new Float64Array(problem.stays.length) };
for (const s of problem.stays) { let e = 0; for (let u = s.a; u < s.d; u++) e += lb.power[s.bus][u] * 0.25; hints.energy[s.id] = e; hints.centre[s.id] = (s.a + s.d) / 2; }
const a = initialAssignment(problem, hints);
console.log('assign', performance.now() - t); t = performance.now();
const live = new AssignedModel(problem, solver, a);
console.log('build', performance.now() - t); t = performance.now();
const r = live.solve();
console.log('solve1', performance.now() - t, r.ms, r.iterations); t = performance.now();
const ids = a.sequence.flat();
const times = [];
for (let i = 0; i < 40; i++) {
  const b = ids[i % ids.length];
  a.to[b] = Math.max(a.from[b] + 1, a.to[b] - 2);
  t = performance.now();
  live.update(a, [problem.stays[b].bus]);
  const u = performance.now() - t; t = performance.now();
  const r2 = live.solve();
  times.push([u.toFixed(1), r2.ms.toFixed(1), r2.iterations].join('/'));
}
console.log(times.join(' '));
