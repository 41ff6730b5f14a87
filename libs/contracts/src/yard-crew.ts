import { z } from 'zod';

// The depot's yard crew: who plugs buses in and out, and when. Plans keep to it: a session lasts
// at least the minimum plug-in; a driver plugs the bus in on pulling in and unplugs it on pulling
// out (no crew move); every other plug-in or unplug is a crew move, made only during a crew shift
// and at most so many in one 15-minute slot.

const shiftClock = z.string().regex(/^([01]\d|2[0-3]):[0-5]\d$/, 'Write the time as HH:mm, 00:00 to 23:59');

/**
 * One crew shift: from and to as local times (a `to` at or before `from` runs past midnight), on
 * the days it starts (`days`, ISO weekdays 1 Monday to 7 Sunday; absent: every day).
 */
export const crewShiftSchema = z
  .strictObject({
    from: shiftClock,
    to: shiftClock,
    movesPerSlot: z
      .number({ error: 'Enter the moves per 15 minutes' })
      .int('A whole number of moves')
      .min(1, 'At least 1 move')
      .max(50, 'At most 50 moves per 15 minutes'),
    days: z
      .array(
        z
          .number()
          .int()
          .min(1, 'A weekday is 1 (Monday) to 7 (Sunday)')
          .max(7, 'A weekday is 1 (Monday) to 7 (Sunday)'),
      )
      .min(1, 'Choose at least one day for the shift')
      .max(7)
      .refine((d) => new Set(d).size === d.length, 'Each day once')
      .optional(),
  })
  .refine((s) => s.from !== s.to, { message: 'A shift must end at another time than it starts', path: ['to'] });
export type CrewShift = z.infer<typeof crewShiftSchema>;

export const yardCrewSchema = z.strictObject({
  minPlugInMinutes: z
    .number({ error: 'Enter the minimum plug-in in minutes' })
    .int('A whole number of minutes')
    .min(0, 'Cannot be negative')
    .max(240, 'At most 240 minutes'),
  driversPlugIn: z.boolean(),
  /** No shift listed: the crew can make moves at any hour, as many as needed. */
  shifts: z.array(crewShiftSchema).max(6, 'At most 6 shifts'),
  /**
   * How much dearer a plan may be to make fewer crew moves or, in a re-plan, to move fewer buses:
   * this share of the night's cost or this amount, whichever is larger.
   */
  costTolerancePercent: z
    .number({ error: 'Enter the tolerance in per cent' })
    .min(0, 'Cannot be negative')
    .max(10, 'At most 10 %')
    .default(0.5),
  costToleranceAmount: z
    .number({ error: 'Enter the tolerance as an amount' })
    .min(0, 'Cannot be negative')
    .max(1000, 'At most 1,000 a night')
    .default(5),
});
export type YardCrew = z.infer<typeof yardCrewSchema>;
/** A yard crew as stored: rows written before the cost tolerance existed lack it (the schema's defaults fill it in). */
export type StoredYardCrew = z.input<typeof yardCrewSchema>;

/** What a depot that has not set its crew plans with: no minimum, drivers plug in, moves any time. */
export const DEFAULT_YARD_CREW: YardCrew = {
  minPlugInMinutes: 0,
  driversPlugIn: true,
  shifts: [],
  costTolerancePercent: 0.5,
  costToleranceAmount: 5,
};
