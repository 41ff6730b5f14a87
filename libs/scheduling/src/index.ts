export {
  scenarioSchema,
  parseScenario,
  localToMillis,
  formatPath,
  type Scenario,
  type ScenarioInput,
  type Problem as ScenarioProblem,
  type ParseResult,
} from './scenario.js';
export { buildSlots, tariffPeriodAt, isoAt, type Slot } from './slots.js';
export { costLoad, tariffOf, type Cost, type CostSlot, type Tariff } from './tariff.js';
export { loadSolver, lpFromRows, Solver, LiveLp, type Lp, type LpResult, type LpStatus } from './highs-solver.js';
export {
  prepareProblem,
  emptyPlugMap,
  type Problem,
  type Bus,
  type Stay,
  type Charger,
  type Cabinet,
  type PlugMap,
} from './problem.js';
export { buildChargeModel, topChargerPower, type ChargeModel, type ModelOptions } from './lp-model.js';
export { solveLowerBound, type LowerBound } from './lower-bound.js';
export { initialAssignment, plugMapOf, type Assignment, type AssignmentHints } from './assignment.js';
export { limitedBaseline, acceptance, type Baseline, type BaselineKind } from './baseline.js';
export { explainShortfalls, soloShortfall, type ShortReason } from './explain.js';
export {
  planScenario,
  planProblem,
  defaultTimeBudgetMs,
  defaultMoves,
  type Plan,
  type PlanOptions,
  type PlanSession,
  type PlanBus,
  type PlanCost,
  type BaselineCost,
  referenceBaseline,
} from './plan.js';
// Rate plans and bills (shared by the engine's users: API, costs, tests).
export {
  dayTypeOf,
  seasonOf,
  ratePlanPeriodAt,
  ratePlanPeriodAtMs,
  pricedSlots,
  daySlots,
  SLOT_MINUTES,
  type PricedSlot,
} from './bill/rate-calendar.js';
export { localParts, offsetMinutes, type LocalParts } from './bill/local-time.js';
export { previewDay } from './bill/rate-preview.js';
export {
  computeBill,
  nightMarginalCost,
  peaksOf,
  type Bill,
  type BillLine,
  type BillOptions,
  type IntervalDemand,
} from './bill/bill.js';
export { quarterHours, type MeterReading } from './bill/quarter-hours.js';
/** Re-planning at a cut-off `now` (energy per bus, buses plugged in, chargers out of service,
 *  late buses): `replan(scenario, state, options?)` plans the rest of the horizon. */
export { replan, deriveScenario, ReplanStateError, type ReplanState, type Replan } from './replan.js';
export { nightBaselines, type NightBaseline } from './night-baselines.js';
export { sweepAssignment, type SweepInput } from './sweep.js';
export {
  serviceNights,
  serviceDayTimes,
  nightsOfDays,
  nightAt,
  nightAtDays,
  nightAmong,
  serviceDayAt,
  calendarNight,
  type ServiceNight,
  type RunTimes,
  type ServiceDayTimes,
  type NightAt,
} from './night/service-night.js';
/** The billing period's demand target: one LP over the period's remaining nights (see period-target.ts). */
export {
  solvePeriodTarget,
  periodTarget,
  underTarget,
  heldAtTarget,
  shiftScenario,
  targetOutcome,
  tradeSentence,
  planUnderTarget,
  type PeriodNight,
  type PeriodTarget,
  type NightCharging,
  type DemandTarget,
  type TargetMarginal,
  type TargetBinding,
  type TargetImpossible,
  type TargetTrade,
  type PlanUnderTarget,
} from './period-target.js';
