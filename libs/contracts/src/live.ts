import { z } from 'zod';

/**
 * What the live stream of a depot (GET /api/depots/:depotId/live, Server-Sent Events) carries.
 * Each event is one SSE message whose `event:` line is the `type` below and whose `data:` line is
 * the JSON of the whole object.
 */

/**
 * A charger's state as it reports it over OCPP: `connected` is a bus plugged in and not drawing
 * (waiting for its hours, or full); `available` is nothing plugged in.
 */
export const liveStatusSchema = z.enum(['available', 'connected', 'charging', 'faulted', 'offline']);
export type LiveStatus = z.infer<typeof liveStatusSchema>;

/** A charger's state as it reports it over OCPP (the same shape as a charger's `live`). */
export const liveChargerSchema = z.object({
  chargerId: z.uuid(),
  label: z.string(),
  status: liveStatusSchema,
  powerKw: z.number().nullable(),
  seenAt: z.iso.datetime({ offset: true }).nullable(),
});
export type LiveCharger = z.infer<typeof liveChargerSchema>;

export const liveEventSchema = z.discriminatedUnion('type', [
  /** First on every (re)connection: every OCPP charger of the depot as last reported. */
  z.object({ type: z.literal('snapshot'), at: z.iso.datetime({ offset: true }), chargers: z.array(liveChargerSchema) }),
  /** One charger changed state or power. */
  z.object({ type: z.literal('charger'), at: z.iso.datetime({ offset: true }), charger: liveChargerSchema }),
  /** A plan was published, or a revision published after a report from the yard. */
  z.object({
    type: z.literal('plan'),
    at: z.iso.datetime({ offset: true }),
    planId: z.uuid(),
    serviceDate: z.string(),
    version: z.number().int(),
    kind: z.enum(['published', 'revised']),
  }),
  /** Something the yard reported (the revision that follows comes as a `plan` event). */
  z.object({
    type: z.literal('notice'),
    at: z.iso.datetime({ offset: true }),
    kind: z.string(),
    text: z.string(),
    charger: z.string().nullable(),
    bus: z.string().nullable(),
  }),
]);
export type LiveEvent = z.infer<typeof liveEventSchema>;
export type LiveEventType = LiveEvent['type'];
