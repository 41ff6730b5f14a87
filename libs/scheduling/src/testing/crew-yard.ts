import { parseScenario, type Scenario, type ScenarioInput } from '../scenario.js';

/**
 * The yard crew of the engine's tests and crew bench: a 45-minute minimum plug-in, drivers plug
 * in on pulling in and unplug on pulling out, an evening crew 15:00-23:30 and an early-morning
 * crew 04:30-07:00 (no one between), 3 and 2 moves per slot for 40 buses, scaled with `scale`.
 */
export function testYard(scale = 1) {
  return {
    minPlugInMinutes: 45,
    driversPlugIn: true,
    crew: [
      { from: '2026-01-14T15:00', to: '2026-01-14T23:30', movesPerSlot: Math.max(3, Math.ceil(3 * scale)) },
      { from: '2026-01-15T04:30', to: '2026-01-15T07:00', movesPerSlot: Math.max(2, Math.ceil(2 * scale)) },
    ],
  };
}

/** The scenario of a test input; a test's own input that does not parse is a broken test. */
export function parsedScenario(input: ScenarioInput): Scenario {
  const p = parseScenario(input);
  if (!p.ok) throw new Error(JSON.stringify(p.problems));
  return p.scenario;
}
