import { randomUUID } from 'node:crypto';
import { cp, mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import pg from 'pg';
import { afterAll, describe, expect, it } from 'vitest';
import { TEST_DATABASE_URL } from '../testing/test-env';
import { createDb } from './client';
import { applyMigrations } from './migrate';

// Migration 0016 on an installation that already has people and depots: nothing may break, so
// every non-admin is assigned every depot of their own organisation (administrators see all anyway).
const name = `nightyard_mig_${randomUUID().slice(0, 8)}`;
const adminUrl = new URL('/postgres', TEST_DATABASE_URL).toString();
const url = new URL(`/${name}`, TEST_DATABASE_URL).toString();
const folders: string[] = [];

afterAll(async () => {
  const admin = new pg.Client({ connectionString: adminUrl });
  await admin.connect();
  await admin.query(`drop database if exists "${name}" with (force)`);
  await admin.end();
  for (const f of folders) await rm(f, { recursive: true, force: true });
});

/** The migrations as they were before 0016 (the journal and files up to 0015). */
async function migrationsBefore(tag: string): Promise<string> {
  const dir = await mkdtemp(path.join(os.tmpdir(), 'nightyard-migrations-'));
  folders.push(dir);
  await cp(path.resolve('drizzle'), dir, { recursive: true });
  const journalPath = path.join(dir, 'meta', '_journal.json');
  const journal = JSON.parse(await readFile(journalPath, 'utf8')) as { entries: { tag: string }[] };
  const at = journal.entries.findIndex((e) => e.tag === tag);
  for (const e of journal.entries.slice(at)) await rm(path.join(dir, `${e.tag}.sql`));
  journal.entries = journal.entries.slice(0, at);
  await writeFile(journalPath, JSON.stringify(journal));
  return dir;
}

describe('migration 0016 (people-depots)', () => {
  it('assigns every existing non-admin every depot of their organisation, and nothing across organisations', async () => {
    const admin = new pg.Client({ connectionString: adminUrl });
    await admin.connect();
    await admin.query(`create database "${name}"`);
    await admin.end();
    const pool = new pg.Pool({ connectionString: url, max: 1 });
    try {
      const db = createDb(pool);
      await applyMigrations(db, await migrationsBefore('0016_people-depots'));
      const q = async (text: string, values: unknown[] = []) => (await pool.query(text, values)).rows;
      const [a] = await q(`insert into organisations (name) values ('A') returning id`);
      const [b] = await q(`insert into organisations (name) values ('B') returning id`);
      const person = async (org: string, email: string, roles: string[]) =>
        (
          await q(`insert into users (organisation_id, email, name, roles) values ($1, $2, $2, $3) returning id`, [
            org,
            email,
            roles,
          ])
        )[0]!.id as string;
      const depot = async (org: string, depotName: string) =>
        (
          await q(
            `insert into depots (organisation_id, name, timezone, service_limit_kw, other_load_kw)
             values ($1, $2, 'America/Chicago', 300, '[20]') returning id`,
            [org, depotName],
          )
        )[0]!.id as string;
      const boss = await person(a.id, 'boss@a.example', ['admin', 'supervisor']);
      const yard = await person(a.id, 'yard@a.example', ['yard']);
      const fin = await person(a.id, 'fin@a.example', ['finance']);
      const other = await person(b.id, 'yard@b.example', ['yard']);
      const a1 = await depot(a.id, 'A1');
      const a2 = await depot(a.id, 'A2');
      const b1 = await depot(b.id, 'B1');

      await applyMigrations(db, path.resolve('drizzle'));

      const rows = await q(`select user_id, depot_id from user_depots`);
      const held = (userId: string) =>
        rows
          .filter((r) => r.user_id === userId)
          .map((r) => r.depot_id)
          .sort();
      expect(held(boss)).toEqual([]);
      expect(held(yard)).toEqual([a1, a2].sort());
      expect(held(fin)).toEqual([a1, a2].sort());
      expect(held(other)).toEqual([b1]);
      expect(await q(`select chosen_depot_id from users where chosen_depot_id is not null`)).toEqual([]);
      // A depot's delete takes its assignments and forgets it as anyone's choice.
      await q(`update users set chosen_depot_id = $1 where id = $2`, [a2, fin]);
      await q(`delete from depots where id = $1`, [a2]);
      expect((await q(`select depot_id from user_depots where user_id = $1`, [fin])).map((r) => r.depot_id)).toEqual([
        a1,
      ]);
      expect((await q(`select chosen_depot_id from users where id = $1`, [fin]))[0]!.chosen_depot_id).toBeNull();
    } finally {
      await pool.end();
    }
  }, 60_000);
});
