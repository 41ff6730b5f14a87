import { z } from 'zod';

/**
 * A service night: from the first pull-in of a service day to the moment the last bus has pulled
 * out on the next service day (weekends and holidays in between belong to the night before them).
 * `serviceDate` names it everywhere (plans, yard steps, e-mails, OCPP profiles).
 */
export const serviceNightSchema = z.object({
  /** The service day the night follows. */
  serviceDate: z.iso.date(),
  /** The service day whose pull-outs end it. */
  nextServiceDate: z.iso.date(),
  /** The first pull-in of `serviceDate` (ISO instant with the depot's offset). */
  start: z.iso.datetime({ offset: true }),
  /** The last bus's first pull-out on `nextServiceDate`. */
  end: z.iso.datetime({ offset: true }),
  /** False when no runs were entered for it: a calendar estimate (12:00 to 12:00 at the depot). */
  fromRuns: z.boolean(),
});
export type ServiceNight = z.infer<typeof serviceNightSchema>;

/** Which night it is at a depot now, as the API's clock sees it. */
export const depotNightSchema = z.object({
  now: z.iso.datetime({ offset: true }),
  timezone: z.string(),
  /** The night under way now, if any. */
  inForce: serviceNightSchema.nullable(),
  /** The next night to start after now. */
  next: serviceNightSchema,
  /** What every screen means by "tonight": the night in force, else the next one. */
  tonight: serviceNightSchema,
});
export type DepotNight = z.infer<typeof depotNightSchema>;

/**
 * Where a calendar date stands among a depot's service days (days with runs entered): Plans steps
 * from service day to service day, and a day inside another's night (a weekend's Saturday) is
 * shown as part of that night rather than offered as a night of its own.
 */
export const dateNightSchema = z.object({
  date: z.iso.date(),
  /** Runs are entered for it: it names a night of its own. */
  serviceDay: z.boolean(),
  /** Not a service day, between two: the service day whose night holds it (Friday, for a Saturday). */
  within: z.iso.date().nullable(),
  /** The nearest service days before and after it (null: none entered). */
  previous: z.iso.date().nullable(),
  next: z.iso.date().nullable(),
});
export type DateNight = z.infer<typeof dateNightSchema>;
