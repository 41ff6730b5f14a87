/** Where the tests find their database and the fake mail server (set by tools/test.sh). */
export const TEST_DATABASE_URL = process.env.DATABASE_URL ?? 'postgres://postgres@127.0.0.1:5434/nightyard_test';
export const TEST_SMTP_PORT = Number(process.env.SMTP_PORT ?? 2526);
export const TEST_FAKE_MAIL_URL = process.env.FAKE_MAIL_URL ?? 'http://127.0.0.1:2581';
