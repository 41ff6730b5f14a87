import { z } from 'zod';

/**
 * Dates and times the API accepts lie in these years: far outside them a value is a typing
 * mistake (0000, 9999), and the time libraries and PostgreSQL disagree about such dates.
 */
export const FIRST_YEAR = 2000;
export const LAST_YEAR = 2100;

const yearInRange = (v: string) => {
  const year = Number(v.slice(0, 4));
  return year >= FIRST_YEAR && year <= LAST_YEAR;
};
const outOfRange = `Use a date in the years ${FIRST_YEAR} to ${LAST_YEAR}`;

/** A calendar date `YYYY-MM-DD` in the accepted years. */
export const isoDate = (message = 'Write the date as YYYY-MM-DD') =>
  z.iso.date(message).refine(yearInRange, outOfRange);

/** Wall-clock time at the depot, `YYYY-MM-DDTHH:mm`, in the accepted years. */
export const localDateTimeSchema = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}T([01]\d|2[0-3]):[0-5]\d$/, 'Write the local time at the depot as YYYY-MM-DDTHH:mm')
  .refine((v) => !Number.isNaN(Date.parse(`${v.slice(0, 10)}T00:00:00Z`)) && validDay(v), 'That day does not exist')
  .refine(yearInRange, outOfRange);

/** 2026-02-30 parses in some engines; compare the round trip to be sure the day exists. */
function validDay(v: string): boolean {
  const d = new Date(`${v.slice(0, 10)}T00:00:00Z`);
  return d.toISOString().slice(0, 10) === v.slice(0, 10);
}
