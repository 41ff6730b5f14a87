import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import * as contracts from './index';
import { FIRST_YEAR, LAST_YEAR } from './dates';
import { text } from './text';
import { textProblem } from './text';
import { leafPaths, setAt } from './testing/json-paths';

// Property-based fuzzing of every request schema: whatever JSON arrives, parsing answers
// success or failure (it never throws), and whatever is accepted is finite, NUL-free,
// well-formed and inside the documented ranges. A fixed seed keeps runs reproducible.

const SEED = 20261202;
const RUNS = 300;

const uuid = '00000000-0000-4000-8000-000000000000';
const window = { dayTypes: ['weekday'], from: '16:00', to: '21:00' };
const definition = {
  currency: 'USD',
  seasons: [
    {
      name: 'All year',
      fromMonth: 1,
      toMonth: 12,
      offPeakPrice: 0.08,
      facilityDemandCharge: 12,
      periods: [{ name: 'on-peak', price: 0.27, demandCharge: 9.5, windows: [window] }],
    },
  ],
  fixedCharges: [{ name: 'Customer charge', amount: 35, per: 'month' }],
  holidays: ['2026-12-25'],
};
const run = {
  busNumber: '11',
  pullOut: '2026-12-07T06:10',
  pullIn: '2026-12-07T08:40',
  miles: 30,
  kwh: null,
  arrivalSocPct: 40,
};

/** One valid request per schema: the fuzzer mutates these as well as sending arbitrary JSON. */
const REQUESTS: Record<string, unknown> = {
  loginRequestSchema: { email: 'a@b.example', password: 'secret' },
  forgotPasswordRequestSchema: { email: 'a@b.example' },
  setPasswordRequestSchema: { token: 'x'.repeat(40), password: 'correct-horse-battery' },
  inviteUserRequestSchema: { email: 'a@b.example', name: 'Ann', roles: ['yard'], depotIds: [uuid] },
  updateUserRequestSchema: { name: 'Ann', roles: ['admin'], active: true, depotIds: [] },
  chooseDepotRequestSchema: { depotId: uuid },
  userIdParamsSchema: { id: uuid },
  depotSettingsSchema: {
    name: 'North',
    timezone: 'America/Chicago',
    serviceLimitKw: 500,
    otherLoadKw: [20],
    billingStartDay: 1,
  },
  cabinetInputSchema: { label: 'P1', limitKw: 120 },
  chargerInputSchema: {
    label: 'A',
    maxKw: 60,
    connector: 'CCS2',
    cabinetId: uuid,
    status: 'out_of_service',
    statusReason: 'Broken',
  },
  loadReductionWindowInputSchema: {
    start: '2026-12-08T16:00',
    end: '2026-12-08T19:00',
    limitKw: 100,
    note: 'Utility event',
  },
  peaksSoFarSchema: { billingPeriodStart: '2026-12-01', facilityKw: 180, periods: { 'on-peak': 150 } },
  depotIdParamsSchema: { depotId: uuid },
  depotItemParamsSchema: { depotId: uuid, id: uuid },
  ratePlanDefinitionSchema: definition,
  saveRatePlanSchema: { name: 'TOU', definition },
  assignRatePlanSchema: { ratePlanId: uuid, effectiveFrom: '2026-01-01' },
  previewQuerySchema: { date: '2026-12-07', timezone: 'America/Chicago' },
  busInputSchema: {
    number: '11',
    usableKwh: 196,
    maxChargeKw: 60,
    connector: 'CCS2',
    kwhPerMile: 1.2,
    ceilingPct: 90,
    reservePct: 15,
    taperStartPct: 85,
  },
  coldWeatherTableSchema: [{ belowF: 32, factor: 1.25 }],
  runInputSchema: run,
  serviceDayInputSchema: { forecastLowF: 20, runs: [run] },
  serviceDayParamsSchema: { depotId: uuid, date: '2026-12-07' },
  copyServiceDaySchema: { fromDate: '2026-12-06', replace: true },
  csvUploadSchema: { csv: 'bus,pull_out,pull_in,miles\n11,06:10,08:40,30\n' },
  generatePlanSchema: { serviceDate: '2026-12-07', includeMidday: false },
  publishPlanSchema: { expectedPublishedId: null },
  planIdParamsSchema: { id: uuid },
  meterImportRequestSchema: { fileName: 'night.xml', content: '<feed/>', billingPeriodStart: '2026-12-01' },
  confirmStepSchema: { planId: uuid, stepKey: 'connect|11|A|2026-12-07T22:00' },
  missedStepSchema: { planId: uuid, stepKey: 'connect|11|A|2026-12-07T22:00' },
  yardReportSchema: { planId: uuid, kind: 'soc_reading', bus: '11', socPct: 40 },
  crewShiftSchema: { from: '15:00', to: '23:30', movesPerSlot: 3 },
  yardCrewSchema: {
    minPlugInMinutes: 45,
    driversPlugIn: true,
    shifts: [{ from: '15:00', to: '23:30', movesPerSlot: 3 }],
  },
};

/** Schemas of answers and stored documents: not request input, so not fuzzed here. */
const NOT_REQUESTS = new Set([
  'errorBodySchema',
  'periodTargetSchema',
  'roleSchema',
  'sectionSchema',
  'organisationSchema',
  'userStatusSchema',
  'sessionUserSchema',
  'tokenResponseSchema',
  'meResponseSchema',
  'actionTokenInfoSchema',
  'userSchema',
  'userListSchema',
  'outboxMessageSchema',
  'outboxSchema',
  'depotSummarySchema',
  'depotListSchema',
  'chosenDepotSchema',
  'districtDepotSchema',
  'districtOverviewSchema',
  'clockTimeSchema',
  'dayTypeSchema',
  'touWindowSchema',
  'touPeriodSchema',
  'seasonSchema',
  'fixedChargeSchema',
  'energyBlockSchema',
  'demandRatchetSchema',
  'minimumChargeSchema',
  'ratePlanSchema',
  'previewIntervalSchema',
  'ratePreviewSchema',
  'urdbImportResultSchema',
  'cabinetSchema',
  'chargerStatusSchema',
  'chargerSchema',
  'localDateTimeSchema',
  'loadReductionWindowSchema',
  'depotDetailSchema',
  'busStatusSchema',
  'busSchema',
  'coldWeatherBandSchema',
  'socSourceSchema',
  'runSchema',
  'serviceDaySchema',
  'csvRowErrorSchema',
  'forecastLowFSchema',
  'planStateSchema',
  'planJobStatusSchema',
  'planKindSchema',
  'planResultSchema',
  'planSummarySchema',
  'planDetailSchema',
  'planComparisonSchema',
  'baselineKindSchema',
  'whatIfAdoptionSchema',
  'adoptedPlanSchema',
  'billLineSchema',
  'billSchema',
  'planCostsSchema',
  'emissionsSchema',
  'monthCostsSchema',
  'meterImportResultSchema',
  'yardStepSchema',
  'yardSessionSchema',
  'tonightPlanSchema',
  'tonightSchema',
  'yardConfirmationSchema',
  'yardReportResultSchema',
  'emailSchema',
  'passwordSchema',
  'serviceNightSchema',
  'depotNightSchema',
  'dateNightSchema',
  'liveStatusSchema',
  'liveChargerSchema',
  'liveEventSchema',
]);

const nastyString = fc.oneof(
  {
    weight: 4,
    arbitrary: fc.constantFrom(
      '',
      ' ',
      '\u0000',
      'a\u0000b',
      '\ud800',
      '\udc00',
      'x\udbffy',
      '\ud83d\ude00',
      '0000-01-01',
      '9999-12-31',
      '1999-12-31',
      '2101-01-01',
      '2026-02-30',
      '2026-12-07',
      '0000-01-01T00:00',
      '9999-12-31T23:59',
      '2026-12-07T06:10',
      uuid,
      'not-a-uuid',
      'USD',
      'America/Chicago',
      'Not/AZone',
      'weekday',
      'admin',
      '16:00',
      '24:00',
      'soc_reading',
      'x'.repeat(5000),
    ),
  },
  fc.string({ maxLength: 30 }),
  fc.string({ unit: 'binary', maxLength: 30 }),
);
const nastyNumber = fc.oneof(
  {
    weight: 3,
    arbitrary: fc.constantFrom(
      1e308,
      -1e308,
      1e300,
      Number.MAX_VALUE,
      Number.MIN_VALUE,
      Number.MAX_SAFE_INTEGER + 2,
      -0,
      0,
      1,
      12,
      100,
      101,
      1e5,
      1e6,
      1e7,
      -1,
    ),
  },
  fc.double(),
  fc.integer(),
);
const nastyLeaf = fc.oneof(nastyString, nastyNumber, fc.boolean(), fc.constant(null));
const { json } = fc.letrec((tie) => ({
  json: fc.oneof(
    { depthSize: 'small', withCrossShrink: true },
    nastyLeaf,
    fc.array(tie('json'), { maxLength: 4 }),
    fc.dictionary(fc.oneof(nastyString, fc.constantFrom('name', 'runs', 'windows', 'periods')), tie('json'), {
      maxKeys: 4,
    }),
  ),
}));

/** A valid request with one to three values swapped for nasty ones. */
const mutated = (sample: unknown) => {
  const paths = leafPaths(sample);
  return fc
    .array(fc.tuple(fc.nat(paths.length - 1), fc.oneof({ weight: 4, arbitrary: nastyLeaf }, json)), {
      minLength: 1,
      maxLength: 3,
    })
    .map((changes) => changes.reduce((acc, [i, leaf]) => setAt(acc, paths[i]!, leaf), sample));
};

const DATE_KEYS = new Set([
  'date',
  'fromDate',
  'serviceDate',
  'effectiveFrom',
  'billingPeriodStart',
  'start',
  'end',
  'pullOut',
  'pullIn',
  'expectedAt',
  'holidays',
]);

/** Everything accepted is storable: finite numbers in range, clean text, dates in range. */
function expectStorable(value: unknown, key = ''): void {
  if (typeof value === 'number') {
    expect(Number.isFinite(value), `${key} = ${value}`).toBe(true);
    expect(Math.abs(value), `${key} = ${value}`).toBeLessThanOrEqual(1e7);
  } else if (typeof value === 'string') {
    expect(textProblem(value), `${key} = ${JSON.stringify(value)}`).toBeNull();
    if (DATE_KEYS.has(key) && /^\d{4}-/.test(value)) {
      const year = Number(value.slice(0, 4));
      expect(year >= FIRST_YEAR && year <= LAST_YEAR, `${key} = ${value}`).toBe(true);
    }
  } else if (Array.isArray(value)) {
    value.forEach((v) => expectStorable(v, key));
  } else if (value && typeof value === 'object') {
    for (const [k, v] of Object.entries(value)) {
      expectStorable(k, `${key}.key`);
      expectStorable(v, k);
    }
  }
}

const schemas = Object.entries(contracts as Record<string, unknown>).filter(
  (e): e is [string, z.ZodType] => e[1] instanceof z.ZodType,
);

describe('request contracts under fuzzing', () => {
  it('every exported schema is either fuzzed as a request or listed as an answer', () => {
    const unclassified = schemas.map(([name]) => name).filter((name) => !(name in REQUESTS) && !NOT_REQUESTS.has(name));
    expect(unclassified).toEqual([]);
  });

  it.each(Object.keys(REQUESTS))('%s: the valid sample passes', (name) => {
    const schema = (contracts as unknown as Record<string, z.ZodType>)[name]!;
    const parsed = schema.safeParse(REQUESTS[name]);
    expect(parsed.error?.issues ?? []).toEqual([]);
  });

  it.each(Object.keys(REQUESTS))('%s: never throws; accepts only finite, clean, in-range values', (name) => {
    const schema = (contracts as unknown as Record<string, z.ZodType>)[name]!;
    fc.assert(
      fc.property(fc.oneof(json, { weight: 4, arbitrary: mutated(REQUESTS[name]) }), (input) => {
        const parsed = schema.safeParse(input);
        if (parsed.success) expectStorable(parsed.data);
      }),
      { seed: SEED, numRuns: RUNS },
    );
  });
});

describe('text fields', () => {
  it('say the limit of a text too long, and what to enter for one that is not text', () => {
    const reason = text('The reason').trim().min(1, 'Say what is wrong').max(300);
    expect(reason.safeParse('x'.repeat(5000)).error?.issues[0]?.message).toBe(
      'The reason is at most 300 characters: shorten it',
    );
    expect(reason.safeParse('  ').error?.issues[0]?.message).toBe('Say what is wrong');
    expect(reason.safeParse(42).error?.issues[0]?.message).toBe('Enter the reason as text');
    expect(text('The charger label').max(40).safeParse('C'.repeat(500)).error?.issues[0]?.message).toBe(
      'The charger label is at most 40 characters: shorten it',
    );
  });
});
