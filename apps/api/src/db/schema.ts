import { sql } from 'drizzle-orm';
import {
  type AnyPgColumn,
  boolean,
  date,
  doublePrecision,
  index,
  integer,
  jsonb,
  pgEnum,
  pgTable,
  primaryKey,
  text,
  timestamp,
  uniqueIndex,
  uuid,
} from 'drizzle-orm/pg-core';
import type {
  ColdWeatherTable,
  MeterImportResult,
  PeaksSoFar,
  PlanResult,
  RatePlanDefinition,
  Role,
  StoredYardCrew,
} from '@nightyard/contracts';
import type { ScenarioInput } from '@nightyard/scheduling';

const id = () =>
  uuid('id')
    .primaryKey()
    .default(sql`gen_random_uuid()`);
const createdAt = () => timestamp('created_at', { withTimezone: true }).notNull().defaultNow();
const orgRef = () =>
  uuid('organisation_id')
    .notNull()
    .references(() => organisations.id, { onDelete: 'cascade' });

export const organisations = pgTable('organisations', {
  id: id(),
  name: text('name').notNull(),
  createdAt: createdAt(),
});

export const userStatus = pgEnum('user_status', ['active', 'invited', 'deactivated']);

export const users = pgTable(
  'users',
  {
    id: id(),
    organisationId: orgRef(),
    email: text('email').notNull(),
    name: text('name').notNull(),
    passwordHash: text('password_hash'),
    roles: text('roles').array().$type<Role[]>().notNull(),
    status: userStatus('status').notNull().default('invited'),
    createdAt: createdAt(),
    lastSignInAt: timestamp('last_sign_in_at', { withTimezone: true }),
    /** The depot the person last chose to work on (remembered for the switcher); null: not chosen. */
    chosenDepotId: uuid('chosen_depot_id').references((): AnyPgColumn => depots.id, { onDelete: 'set null' }),
  },
  (t) => [uniqueIndex('users_email_key').on(t.email), index('users_org_idx').on(t.organisationId)],
);

/** Refresh tokens rotate: each use replaces the token; a reused old token revokes its family. */
export const refreshTokens = pgTable(
  'refresh_tokens',
  {
    id: id(),
    userId: uuid('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    familyId: uuid('family_id').notNull(),
    tokenHash: text('token_hash').notNull(),
    expiresAt: timestamp('expires_at', { withTimezone: true }).notNull(),
    usedAt: timestamp('used_at', { withTimezone: true }),
    revokedAt: timestamp('revoked_at', { withTimezone: true }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('refresh_tokens_hash_key').on(t.tokenHash), index('refresh_tokens_family_idx').on(t.familyId)],
);

export const actionTokenPurpose = pgEnum('action_token_purpose', ['invite', 'reset']);

/** Single-use links sent by e-mail: invitations and password resets. Only the hash is stored. */
export const actionTokens = pgTable(
  'action_tokens',
  {
    id: id(),
    userId: uuid('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    purpose: actionTokenPurpose('purpose').notNull(),
    tokenHash: text('token_hash').notNull(),
    expiresAt: timestamp('expires_at', { withTimezone: true }).notNull(),
    usedAt: timestamp('used_at', { withTimezone: true }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('action_tokens_hash_key').on(t.tokenHash)],
);

export const loginAttempts = pgTable(
  'login_attempts',
  {
    id: id(),
    email: text('email').notNull(),
    ip: text('ip').notNull(),
    succeeded: boolean('succeeded').notNull(),
    at: createdAt(),
  },
  (t) => [index('login_attempts_email_idx').on(t.email, t.at), index('login_attempts_ip_idx').on(t.ip, t.at)],
);

/** Password-reset requests, counted per account address and per client address (throttle). */
export const passwordResetRequests = pgTable(
  'password_reset_requests',
  {
    id: id(),
    email: text('email').notNull(),
    ip: text('ip').notNull(),
    at: createdAt(),
  },
  (t) => [
    index('password_reset_requests_email_idx').on(t.email, t.at),
    index('password_reset_requests_ip_idx').on(t.ip, t.at),
  ],
);

export const depots = pgTable(
  'depots',
  {
    id: id(),
    organisationId: orgRef(),
    name: text('name').notNull(),
    timezone: text('timezone').notNull(),
    serviceLimitKw: doublePrecision('service_limit_kw').notNull(),
    /** 24 values, kW by local hour; a flat load repeats one value. */
    otherLoadKw: jsonb('other_load_kw').$type<number[]>().notNull(),
    billingStartDay: integer('billing_start_day').notNull().default(1),
    coldWeatherFactors: jsonb('cold_weather_factors')
      .$type<ColdWeatherTable>()
      .notNull()
      .default([
        { belowF: 50, factor: 1.1 },
        { belowF: 32, factor: 1.25 },
        { belowF: 14, factor: 1.4 },
      ]),
    /** The yard crew plans keep to (rows written before the cost tolerance lack it); null: not set. */
    yardCrew: jsonb('yard_crew').$type<StoredYardCrew>(),
    createdAt: createdAt(),
  },
  (t) => [index('depots_org_idx').on(t.organisationId)],
);

/**
 * The depots each person is assigned to. Administrators see every depot of their organisation
 * whatever this holds; everyone else only these (apps/api/src/depots/depot-access.ts). Changes
 * notify nightyard_user_changed (migration 0016), so the signed-in user cache reads them again.
 */
export const userDepots = pgTable(
  'user_depots',
  {
    userId: uuid('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    depotId: uuid('depot_id')
      .notNull()
      .references(() => depots.id, { onDelete: 'cascade' }),
  },
  (t) => [primaryKey({ columns: [t.userId, t.depotId] }), index('user_depots_depot_idx').on(t.depotId)],
);

export const powerCabinets = pgTable(
  'power_cabinets',
  {
    id: id(),
    organisationId: orgRef(),
    depotId: uuid('depot_id')
      .notNull()
      .references(() => depots.id, { onDelete: 'cascade' }),
    label: text('label').notNull(),
    limitKw: doublePrecision('limit_kw').notNull(),
    createdAt: createdAt(),
  },
  // Chargers are wired to a cabinet by choosing its label: two of one name are two limits confused.
  (t) => [uniqueIndex('power_cabinets_depot_label_key').on(t.depotId, t.label)],
);

export const chargerStatus = pgEnum('charger_status', ['in_service', 'out_of_service']);

export const chargers = pgTable(
  'chargers',
  {
    id: id(),
    organisationId: orgRef(),
    depotId: uuid('depot_id')
      .notNull()
      .references(() => depots.id, { onDelete: 'cascade' }),
    cabinetId: uuid('cabinet_id').references(() => powerCabinets.id, { onDelete: 'set null' }),
    label: text('label').notNull(),
    maxKw: doublePrecision('max_kw').notNull(),
    connector: text('connector').notNull(),
    status: chargerStatus('status').notNull().default('in_service'),
    statusReason: text('status_reason'),
    statusSince: timestamp('status_since', { withTimezone: true }),
    /**
     * The period an out-of-service charger is out (either end open). Both null: out until it is
     * put back in service. Outside its period the charger counts as in service.
     */
    outFrom: timestamp('out_from', { withTimezone: true }),
    outUntil: timestamp('out_until', { withTimezone: true }),
    /** OCPP charge point identity and connector / EVSE of this dispenser. */
    ocppIdentity: text('ocpp_identity'),
    ocppPasswordHash: text('ocpp_password_hash'),
    connectorId: integer('connector_id').notNull().default(1),
    evseId: integer('evse_id').notNull().default(1),
    /** What the charger last told the central system (OCPP StatusNotification, MeterValues). */
    liveStatus: text('live_status'),
    livePowerW: doublePrecision('live_power_w'),
    liveSeenAt: timestamp('live_seen_at', { withTimezone: true }),
    liveConnected: boolean('live_connected').notNull().default(false),
    createdAt: createdAt(),
  },
  (t) => [
    uniqueIndex('chargers_depot_label_key').on(t.depotId, t.label),
    uniqueIndex('chargers_ocpp_identity_key').on(t.ocppIdentity),
  ],
);

export const busStatus = pgEnum('bus_status', ['active', 'out_of_service', 'retired']);

export const buses = pgTable(
  'buses',
  {
    id: id(),
    organisationId: orgRef(),
    depotId: uuid('depot_id')
      .notNull()
      .references(() => depots.id, { onDelete: 'cascade' }),
    number: text('number').notNull(),
    usableKwh: doublePrecision('usable_kwh').notNull(),
    maxChargeKw: doublePrecision('max_charge_kw').notNull(),
    connector: text('connector').notNull(),
    kwhPerMile: doublePrecision('kwh_per_mile').notNull(),
    ceilingPct: doublePrecision('ceiling_pct').notNull().default(90),
    reservePct: doublePrecision('reserve_pct').notNull().default(15),
    taperStartPct: doublePrecision('taper_start_pct'),
    status: busStatus('status').notNull().default('active'),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('buses_depot_number_key').on(t.depotId, t.number)],
);

/** A rate plan's tariff document (seasons, time-of-use periods, charges), validated by zod. */
export const ratePlans = pgTable('rate_plans', {
  id: id(),
  organisationId: orgRef(),
  name: text('name').notNull(),
  currency: text('currency').notNull(),
  definition: jsonb('definition').$type<RatePlanDefinition>().notNull(),
  createdAt: createdAt(),
});

export const depotRatePlans = pgTable(
  'depot_rate_plans',
  {
    id: id(),
    organisationId: orgRef(),
    depotId: uuid('depot_id')
      .notNull()
      .references(() => depots.id, { onDelete: 'cascade' }),
    ratePlanId: uuid('rate_plan_id')
      .notNull()
      .references(() => ratePlans.id, { onDelete: 'restrict' }),
    effectiveFrom: date('effective_from').notNull(),
  },
  (t) => [uniqueIndex('depot_rate_plans_key').on(t.depotId, t.effectiveFrom)],
);

/** Where an arrival reading came from: typed in, uploaded with the runs, estimated from miles, or read by the charger at plug-in. */
export const socSource = pgEnum('soc_source', ['typed', 'uploaded', 'estimated', 'charger']);

/** A service day's conditions: the forecast low sets the cold-weather factor. */
export const serviceDays = pgTable(
  'service_days',
  {
    organisationId: orgRef(),
    depotId: uuid('depot_id')
      .notNull()
      .references(() => depots.id, { onDelete: 'cascade' }),
    serviceDate: date('service_date').notNull(),
    forecastLowF: doublePrecision('forecast_low_f'),
  },
  (t) => [primaryKey({ columns: [t.depotId, t.serviceDate] })],
);

/** One run of a bus on a service day: it leaves the depot at pull-out and returns at pull-in. */
export const runs = pgTable(
  'runs',
  {
    id: id(),
    organisationId: orgRef(),
    depotId: uuid('depot_id')
      .notNull()
      .references(() => depots.id, { onDelete: 'cascade' }),
    busId: uuid('bus_id')
      .notNull()
      .references(() => buses.id, { onDelete: 'cascade' }),
    serviceDate: date('service_date').notNull(),
    pullOut: timestamp('pull_out', { withTimezone: true }).notNull(),
    pullIn: timestamp('pull_in', { withTimezone: true }).notNull(),
    miles: doublePrecision('miles'),
    kwh: doublePrecision('kwh'),
    /** State of charge when the bus pulls in from this run. */
    arrivalSocPct: doublePrecision('arrival_soc_pct'),
    arrivalSocSource: socSource('arrival_soc_source'),
    createdAt: createdAt(),
  },
  (t) => [index('runs_depot_date_idx').on(t.depotId, t.serviceDate), index('runs_bus_idx').on(t.busId)],
);

/** Times the utility asks the site to stay under a lower limit. */
export const loadReductionWindows = pgTable(
  'load_reduction_windows',
  {
    id: id(),
    organisationId: orgRef(),
    depotId: uuid('depot_id')
      .notNull()
      .references(() => depots.id, { onDelete: 'cascade' }),
    startsAt: timestamp('starts_at', { withTimezone: true }).notNull(),
    endsAt: timestamp('ends_at', { withTimezone: true }).notNull(),
    limitKw: doublePrecision('limit_kw').notNull(),
    note: text('note').notNull().default(''),
  },
  (t) => [index('load_reduction_depot_idx').on(t.depotId, t.startsAt)],
);

/** The current billing period's highest 15-minute demands so far, facility and per period. */
export const billingPeaks = pgTable('billing_peaks', {
  depotId: uuid('depot_id')
    .primaryKey()
    .references(() => depots.id, { onDelete: 'cascade' }),
  organisationId: orgRef(),
  billingPeriodStart: date('billing_period_start').notNull(),
  facilityKw: doublePrecision('facility_kw').notNull(),
  periodsKw: jsonb('periods_kw').$type<PeaksSoFar['periods']>().notNull(),
  updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
});

export const planState = pgEnum('plan_state', ['draft', 'published', 'superseded']);
export const planJobStatus = pgEnum('plan_job_status', ['queued', 'running', 'done', 'failed']);
export const planKind = pgEnum('plan_kind', ['generated', 'what-if', 'revision']);

/**
 * A charging plan for one depot's night (service date = the day whose evening it starts).
 * `scenario` is the engine's input as it was; `result` the engine's plan. Published plans are
 * never changed: a new version supersedes them.
 */
export const plans = pgTable(
  'plans',
  {
    id: id(),
    organisationId: orgRef(),
    depotId: uuid('depot_id')
      .notNull()
      .references(() => depots.id, { onDelete: 'cascade' }),
    serviceDate: date('service_date').notNull(),
    version: integer('version').notNull(),
    kind: planKind('kind').notNull().default('generated'),
    state: planState('state').notNull().default('draft'),
    status: planJobStatus('status').notNull().default('queued'),
    stage: text('stage').notNull().default('Waiting for a worker'),
    error: text('error'),
    /** Engine runs started for this plan; a run cut short (process killed) is retried once. */
    attempts: integer('attempts').notNull().default(0),
    includesMidday: boolean('includes_midday').notNull().default(true),
    scenario: jsonb('scenario').$type<ScenarioInput>().notNull(),
    notes: jsonb('notes').$type<string[]>().notNull().default([]),
    result: jsonb('result').$type<PlanResult>(),
    /**
     * For a revision: what the yard reported so far tonight, applied to the night's scenario. For a
     * plan made while its night was under way: where it starts and what it keeps (see PlanFrom).
     */
    replanState: jsonb('replan_state').$type<{
      outOfService?: string[];
      lateArrivals?: Record<string, string>;
      absent?: string[];
      /** States of charge read tonight, by bus: later re-plans start such a bus from its reading. */
      socReadings?: Record<string, { kwh: number; at: string }>;
      from?: string;
      previousPlanId?: string | null;
      plugged?: Record<string, string>;
    }>(),
    createdBy: uuid('created_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
    publishedAt: timestamp('published_at', { withTimezone: true }),
    publishedBy: uuid('published_by').references(() => users.id, { onDelete: 'set null' }),
  },
  (t) => [
    uniqueIndex('plans_depot_date_version_key').on(t.depotId, t.serviceDate, t.version),
    // At most one published plan per depot and night: the database settles a publishing race.
    uniqueIndex('plans_one_published_key')
      .on(t.depotId, t.serviceDate)
      .where(sql`${t.state} = 'published'`),
  ],
);

/** Utility interval meter data (actual site demand), one row per interval. */
export const meterIntervals = pgTable(
  'meter_intervals',
  {
    organisationId: orgRef(),
    depotId: uuid('depot_id')
      .notNull()
      .references(() => depots.id, { onDelete: 'cascade' }),
    startsAt: timestamp('starts_at', { withTimezone: true }).notNull(),
    minutes: integer('minutes').notNull(),
    kwh: doublePrecision('kwh').notNull(),
    importId: uuid('import_id').notNull(),
  },
  (t) => [primaryKey({ columns: [t.depotId, t.startsAt] })],
);

export const meterImports = pgTable('meter_imports', {
  id: id(),
  organisationId: orgRef(),
  depotId: uuid('depot_id')
    .notNull()
    .references(() => depots.id, { onDelete: 'cascade' }),
  fileName: text('file_name').notNull(),
  format: text('format').notNull(),
  billingPeriodStart: date('billing_period_start').notNull(),
  intervals: integer('intervals').notNull(),
  duplicates: integer('duplicates').notNull(),
  gaps: jsonb('gaps').$type<MeterImportResult['gaps']>().notNull(),
  importedBy: uuid('imported_by').references(() => users.id, { onDelete: 'set null' }),
  createdAt: createdAt(),
});

/**
 * A yard step done: a bus connected to or disconnected from a charger. Keyed by night and step,
 * so a step kept by a revision stays done, and the same confirmation sent twice is stored once.
 */
export const yardConfirmations = pgTable(
  'yard_confirmations',
  {
    id: id(),
    organisationId: orgRef(),
    depotId: uuid('depot_id')
      .notNull()
      .references(() => depots.id, { onDelete: 'cascade' }),
    serviceDate: date('service_date').notNull(),
    stepKey: text('step_key').notNull(),
    planId: uuid('plan_id')
      .notNull()
      .references(() => plans.id, { onDelete: 'cascade' }),
    confirmedBy: uuid('confirmed_by').references(() => users.id, { onDelete: 'set null' }),
    /** When it happened (the time the yard gave, else when confirmed). */
    confirmedAt: timestamp('confirmed_at', { withTimezone: true }).notNull().defaultNow(),
    /** `missed`: the yard said the step did not happen, and the night was re-planned from that. */
    outcome: text('outcome', { enum: ['done', 'missed'] })
      .notNull()
      .default('done'),
  },
  (t) => [uniqueIndex('yard_confirmations_step_key').on(t.depotId, t.serviceDate, t.stepKey)],
);

export const yardReportKind = pgEnum('yard_report_kind', [
  'bus_late',
  'bus_absent',
  'charger_out',
  'soc_reading',
  'step_missed',
]);

/** What the yard reported as different from the plan, and the revision it led to. */
export const yardReports = pgTable('yard_reports', {
  id: id(),
  organisationId: orgRef(),
  depotId: uuid('depot_id')
    .notNull()
    .references(() => depots.id, { onDelete: 'cascade' }),
  serviceDate: date('service_date').notNull(),
  kind: yardReportKind('kind').notNull(),
  bus: text('bus'),
  charger: text('charger'),
  expectedAt: timestamp('expected_at', { withTimezone: true }),
  socPct: doublePrecision('soc_pct'),
  reason: text('reason'),
  planId: uuid('plan_id')
    .notNull()
    .references(() => plans.id, { onDelete: 'cascade' }),
  revisionId: uuid('revision_id').references(() => plans.id, { onDelete: 'set null' }),
  reportedBy: uuid('reported_by').references(() => users.id, { onDelete: 'set null' }),
  reportedAt: timestamp('reported_at', { withTimezone: true }).notNull().defaultNow(),
});

/** The high-voltage cautions, acknowledged once per person and shift (night). */
export const shiftAcknowledgements = pgTable(
  'shift_acknowledgements',
  {
    userId: uuid('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    depotId: uuid('depot_id')
      .notNull()
      .references(() => depots.id, { onDelete: 'cascade' }),
    serviceDate: date('service_date').notNull(),
    acknowledgedAt: timestamp('acknowledged_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.userId, t.depotId, t.serviceDate] })],
);

/**
 * Answers to writes sent with an `Idempotency-Key` header, kept 24 hours: a retry with the same
 * key and body gets the stored answer instead of doing the write again. `status` is null while
 * the first request is still being carried out.
 */
export const idempotencyKeys = pgTable(
  'idempotency_keys',
  {
    id: id(),
    userId: uuid('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    key: text('key').notNull(),
    /** Method and route pattern, e.g. `PUT /depots/:depotId/service-days/:date`. */
    route: text('route').notNull(),
    /** SHA-256 of the method, the path with its parameters and the canonical JSON body. */
    requestHash: text('request_hash').notNull(),
    status: integer('status'),
    response: jsonb('response').$type<unknown>(),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull(),
  },
  (t) => [
    uniqueIndex('idempotency_keys_user_key').on(t.userId, t.key),
    index('idempotency_keys_created_idx').on(t.createdAt),
  ],
);
