import { z } from 'zod';

const configSchema = z.object({
  NODE_ENV: z.enum(['development', 'test', 'production']).default('development'),
  PORT: z.coerce.number().int().min(1).max(65535).default(3000),
  DATABASE_URL: z.string().default('postgres://postgres@127.0.0.1:5433/nightyard'),
  /** Signs access tokens. Development gets a fixed default; set a long random value elsewhere. */
  JWT_SECRET: z.string().min(32).default('development-only-secret-change-me-in-production-0123'),
  ACCESS_TOKEN_SECONDS: z.coerce.number().int().min(10).default(900),
  REFRESH_TOKEN_DAYS: z.coerce.number().int().min(1).default(14),
  INVITE_HOURS: z.coerce.number().int().min(1).default(72),
  RESET_MINUTES: z.coerce.number().int().min(5).default(60),
  PUBLIC_URL: z.string().url().optional(),
  SMTP_HOST: z.string().default('127.0.0.1'),
  SMTP_PORT: z.coerce.number().int().default(2525),
  MAIL_FROM: z.string().default('Nightyard <no-reply@nightyard.example>'),
  /** The local fake mail server's message list; when set, admins get the Outbox page. */
  FAKE_MAIL_URL: z.string().url().optional(),
  WEB_DIST: z.string().optional(),
  MIGRATIONS_DIR: z.string().optional(),
  /**
   * Demo district and accounts on an empty database: `if-empty` (the default outside production),
   * `never` (the default in production), `always` (seed an empty database even in production).
   */
  SEED_DEMO: z.enum(['if-empty', 'never', 'always']).optional(),
  LOG_LEVEL: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
  LOGIN_MAX_FAILURES_PER_ACCOUNT: z.coerce.number().int().min(1).default(5),
  LOGIN_MAX_FAILURES_PER_ADDRESS: z.coerce.number().int().min(1).default(20),
  LOGIN_WINDOW_MINUTES: z.coerce.number().int().min(1).default(15),
  /** Worker threads for plans and re-plans (each solves one at a time), and for hashing and file parses. */
  ENGINE_THREADS: z.coerce.number().int().min(1).max(16).default(1),
  QUICK_THREADS: z.coerce.number().int().min(1).max(16).default(1),
});

export type Config = Omit<z.infer<typeof configSchema>, 'SEED_DEMO'> & { SEED_DEMO: 'if-empty' | 'never' | 'always' };

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const parsed = configSchema.safeParse(env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join('.')}: ${i.message}`);
    throw new Error(`Configuration is not valid:\n${lines.join('\n')}`);
  }
  if (parsed.data.NODE_ENV === 'production' && parsed.data.JWT_SECRET.startsWith('development-only')) {
    throw new Error('Configuration is not valid:\n  JWT_SECRET: set a long random secret in production');
  }
  const production = parsed.data.NODE_ENV === 'production';
  if (production && parsed.data.SEED_DEMO === 'if-empty') {
    throw new Error(
      'Configuration is not valid:\n  SEED_DEMO: production never gets the demo accounts by default; set SEED_DEMO=always to seed an empty database on purpose',
    );
  }
  return { ...parsed.data, SEED_DEMO: parsed.data.SEED_DEMO ?? (production ? 'never' : 'if-empty') };
}

/** Whether an empty database gets the demo district and its well-known demo passwords. */
export function wantsDemoSeed(config: Pick<Config, 'SEED_DEMO'>): boolean {
  return config.SEED_DEMO !== 'never';
}
