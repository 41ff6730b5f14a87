import { z } from 'zod';
import { lower, text } from './text';
import { isoDate, localDateTimeSchema } from './dates';

const positive = (what: string, max: number) =>
  z
    .number({ error: `Enter ${lower(what)} as a number` })
    .gt(0, `${what} must be above 0`)
    .max(max, `${what} looks too large (at most ${max})`);
const pct = (what: string) =>
  z
    .number({ error: `Enter ${lower(what)} as a number` })
    .min(0, `${what} is 0 to 100 %`)
    .max(100, `${what} is 0 to 100 %`);

export const busStatusSchema = z.enum(['active', 'out_of_service', 'retired']);

export const busInputSchema = z
  .strictObject({
    number: text('The bus number').trim().min(1, 'Enter the bus number').max(20),
    usableKwh: positive('The usable energy', 2000),
    maxChargeKw: positive('The maximum charge power', 2000),
    connector: text('The connector').trim().min(1, 'Choose the connector standard').max(60),
    kwhPerMile: positive('The consumption', 20),
    ceilingPct: pct('The departure ceiling').default(90),
    reservePct: pct('The reserve').default(15),
    /** Taper from: the state of charge (%) above which the battery takes power only slowly. */
    taperStartPct: z
      .number({ error: 'Enter taper from as a % state of charge' })
      .min(0, 'Taper from is 0 to 100 % state of charge')
      .max(100, 'Taper from is 0 to 100 % state of charge')
      .nullable()
      .default(null),
    status: busStatusSchema.default('active'),
  })
  .refine((b) => b.reservePct < b.ceilingPct, {
    message: 'The reserve must be below the departure ceiling',
    path: ['reservePct'],
  })
  .refine((b) => b.taperStartPct === null || b.taperStartPct < 100, {
    message: 'Taper from must be below 100 % state of charge',
    path: ['taperStartPct'],
  });
export type BusInput = z.infer<typeof busInputSchema>;

export const busSchema = z.object({
  id: z.uuid(),
  number: z.string(),
  usableKwh: z.number(),
  maxChargeKw: z.number(),
  connector: z.string(),
  kwhPerMile: z.number(),
  ceilingPct: z.number(),
  reservePct: z.number(),
  taperStartPct: z.number().nullable(),
  status: busStatusSchema,
});
export type Bus = z.infer<typeof busSchema>;

/** Energy per mile rises in the cold: below `belowF` degrees Fahrenheit, multiply by `factor`. */
export const coldWeatherBandSchema = z.strictObject({
  belowF: z.number().min(-80).max(120),
  factor: z.number().min(1, 'A factor is 1 or more').max(3, 'A factor is at most 3'),
});
export const coldWeatherTableSchema = z
  .array(coldWeatherBandSchema)
  .max(12)
  .refine((t) => new Set(t.map((b) => b.belowF)).size === t.length, 'Each temperature once');
export type ColdWeatherTable = z.infer<typeof coldWeatherTableSchema>;

/** 10-40 % more energy per mile in winter (range of reported pilots; common practice). */
export const DEFAULT_COLD_WEATHER_TABLE: ColdWeatherTable = [
  { belowF: 50, factor: 1.1 },
  { belowF: 32, factor: 1.25 },
  { belowF: 14, factor: 1.4 },
];

export function coldWeatherFactor(table: ColdWeatherTable, lowF: number | null): number {
  if (lowF === null) return 1;
  const bands = [...table].sort((a, b) => a.belowF - b.belowF);
  return bands.find((b) => lowF < b.belowF)?.factor ?? 1;
}

export const socSourceSchema = z.enum(['typed', 'uploaded', 'estimated', 'charger']);

export const runInputSchema = z
  .strictObject({
    busNumber: text('The bus number').trim().min(1, 'Enter the bus number').max(20),
    pullOut: localDateTimeSchema,
    pullIn: localDateTimeSchema,
    miles: z
      .number()
      .min(0, 'Miles cannot be negative')
      .max(1000, 'At most 1,000 miles a run: check the figure')
      .nullable()
      .default(null),
    kwh: z
      .number()
      .min(0, 'Energy cannot be negative')
      .max(2000, 'At most 2,000 kWh a run: check the figure')
      .nullable()
      .default(null),
    arrivalSocPct: pct('The state of charge on arrival').nullable().default(null),
  })
  .refine((r) => r.pullIn > r.pullOut, { message: 'The pull-in must be after the pull-out', path: ['pullIn'] })
  .refine((r) => r.miles !== null || r.kwh !== null, {
    message: "Give the run's miles or its energy (kWh)",
    path: ['miles'],
  });
export type RunInput = z.infer<typeof runInputSchema>;

/** Most runs one service day may hold (typed or uploaded): far above any depot's day. */
export const MAX_RUNS_PER_DAY = 5000;

export const forecastLowFSchema = z
  .number({ error: 'Enter the forecast low in °F' })
  .min(-80, 'The forecast low is -80 to 130 °F')
  .max(130, 'The forecast low is -80 to 130 °F');

export const serviceDayInputSchema = z.strictObject({
  forecastLowF: forecastLowFSchema.nullable().default(null),
  runs: z.array(runInputSchema).max(MAX_RUNS_PER_DAY, `A day holds at most ${MAX_RUNS_PER_DAY} runs`),
});
export type ServiceDayInput = z.infer<typeof serviceDayInputSchema>;

export const runSchema = z.object({
  id: z.uuid(),
  busId: z.uuid(),
  busNumber: z.string(),
  pullOut: z.string(),
  pullIn: z.string(),
  miles: z.number().nullable(),
  kwh: z.number().nullable(),
  /** kWh the run uses: its energy, or miles x consumption x the day's cold-weather factor. */
  energyKwh: z.number(),
  arrivalSocPct: z.number().nullable(),
  arrivalSocSource: socSourceSchema.nullable(),
  estimatedArrivalSocPct: z.number(),
});
export type Run = z.infer<typeof runSchema>;

export const serviceDaySchema = z.object({
  date: z.iso.date(),
  forecastLowF: z.number().nullable(),
  coldWeatherFactor: z.number(),
  runs: z.array(runSchema),
});
export type ServiceDay = z.infer<typeof serviceDaySchema>;

export const serviceDayParamsSchema = z.strictObject({
  depotId: z.uuid('Not a depot id'),
  date: isoDate(),
});

export const copyServiceDaySchema = z.strictObject({
  fromDate: isoDate(),
  replace: z.boolean().default(false),
});

export const csvUploadSchema = z.strictObject({
  csv: text('The file').min(1, 'The file is empty').max(2_000_000, 'The file is too large (2 MB at most)'),
});

export const csvRowErrorSchema = z.object({ line: z.number().int(), field: z.string(), message: z.string() });
export type CsvRowError = z.infer<typeof csvRowErrorSchema>;
