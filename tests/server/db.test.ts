import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { QueryTypes } from 'sequelize';
import { openDatabase, type Database } from '../../server/db';
import { instanceOf, saveChanged } from '../../server/db/rows';
import { DEMO_WORKSHOP_TITLE, seedDemo } from '../../server/db/seed';

let dir: string;
let db: Database;

beforeAll(async () => {
  dir = await fs.mkdtemp(path.join(os.tmpdir(), 'cairn-db-'));
  db = await openDatabase(path.join(dir, 'cairn.sqlite'));
  await db.sequelize.query('CREATE TABLE scratch (n INTEGER NOT NULL UNIQUE)');
});
afterAll(async () => {
  await db.close();
  await fs.rm(dir, { recursive: true, force: true });
});

/** Holds the writer queue with a solo transaction until `release` is called, so what is queued meanwhile forms one batch. */
function holdQueue(): { release: () => void; done: Promise<unknown> } {
  let release = () => {};
  const held = new Promise<void>((resolve) => (release = resolve));
  return { release, done: db.writeTx(() => held) };
}

async function stored(): Promise<number[]> {
  const rows = await db.sequelize.query<{ n: number }>('SELECT n FROM scratch ORDER BY n', { type: QueryTypes.SELECT });
  return rows.map((r) => r.n);
}

describe('the connections', () => {
  it('keep a statement journal in memory, overwrite deleted rows and sync at checkpoints, on the writer and the reader', async () => {
    // PRAGMA values from SQLite's documentation (sqlite.org/pragma.html): temp_store 2 = MEMORY, synchronous 1 = NORMAL, secure_delete 1 = ON.
    const expected = { temp_store: 2, synchronous: 1, secure_delete: 1 };
    // Each setting as a connection reports it, through that connection's way of reading.
    const settings = async (all: (sql: string) => Promise<Record<string, number>[]>) => {
      const out: Record<string, number> = {};
      for (const name of Object.keys(expected)) out[name] = Number((await all(`PRAGMA ${name}`))[0]?.[name]);
      return out;
    };
    const onWriter = await db.batchTx((t) => settings((sql) => db.raw(t).all<Record<string, number>>(sql, [])));
    expect(onWriter).toEqual(expected);
    const onReader = await settings((sql) => db.read<Record<string, number>>(sql, []));
    expect(onReader).toEqual(expected);
  });
});

describe('the writer queue', () => {
  it('stores what a group commit collected in its before-commit step, once for the whole batch', async () => {
    await db.sequelize.query('DELETE FROM scratch');
    const hold = holdQueue();
    const collected = new WeakMap<object, number[]>();
    let flushes = 0;
    const pending = Promise.all(
      [1, 2, 3, 4].map((n) =>
        db.batchTx(async (t) => {
          let mine = collected.get(t);
          if (!mine) {
            const rows: number[] = [];
            collected.set(t, (mine = rows));
            db.beforeCommit(t, async () => {
              flushes += 1;
              await db.raw(t).once(`INSERT INTO scratch (n) VALUES ${rows.map(() => '(?)').join(', ')}`, rows);
            });
          }
          mine.push(n);
          return n * 10;
        }),
      ),
    );
    hold.release();
    await hold.done;
    expect(await pending).toEqual([10, 20, 30, 40]);
    // The four waited side by side, so they shared one transaction and one multi-row insert.
    expect(flushes).toBe(1);
    expect(await stored()).toEqual([1, 2, 3, 4]);
  });

  it('rolls the whole batch back when its before-commit step fails, and tells every caller', async () => {
    await db.sequelize.query('DELETE FROM scratch');
    await db.sequelize.query('INSERT INTO scratch (n) VALUES (7)');
    const rolledBack: number[] = [];
    let hooked = false;
    const hold = holdQueue();
    const pending = Promise.allSettled(
      [5, 6, 7].map((n) =>
        db.batchTx(
          async (t) => {
            await db.raw(t).run('INSERT INTO scratch (n) VALUES (?)', [n + 100]);
            if (!hooked) {
              hooked = true;
              // 7 is there already: the unique index refuses the insert at the end of the batch.
              db.beforeCommit(t, () => db.raw(t).once('INSERT INTO scratch (n) VALUES (?), (?), (?)', [5, 6, 7]));
            }
            return n;
          },
          () => rolledBack.push(n),
        ),
      ),
    );
    hold.release();
    await hold.done;
    const answers = await pending;
    expect(answers.map((a) => a.status)).toEqual(['rejected', 'rejected', 'rejected']);
    expect(rolledBack.sort()).toEqual([5, 6, 7]);
    expect(await stored()).toEqual([7]);
  });

  it('runs the before-commit step of a solo write transaction too', async () => {
    await db.sequelize.query('DELETE FROM scratch');
    const result = await db.writeTx(async (t) => {
      db.beforeCommit(t, () => db.raw(t).once('INSERT INTO scratch (n) VALUES (?), (?)', [1, 2]));
      return 'done';
    });
    expect(result).toBe('done');
    expect(await stored()).toEqual([1, 2]);
  });

  it('lets the writes already queued commit before it closes', async () => {
    const file = path.join(dir, 'closing.sqlite');
    const closing = await openDatabase(file);
    await closing.sequelize.query('CREATE TABLE scratch (n INTEGER NOT NULL)');
    const slow = closing.writeTx(async (t) => {
      await new Promise((r) => setTimeout(r, 50));
      await closing.raw(t).run('INSERT INTO scratch (n) VALUES (?)', [1]);
      return 'committed';
    });
    const queued = closing.batchTx(async (t) => {
      await closing.raw(t).run('INSERT INTO scratch (n) VALUES (?)', [2]);
      return 'committed too';
    });
    await closing.close();
    expect(await slow).toBe('committed');
    expect(await queued).toBe('committed too');
    const reopened = await openDatabase(file);
    const rows = await reopened.sequelize.query<{ n: number }>('SELECT n FROM scratch ORDER BY n', { type: QueryTypes.SELECT });
    expect(rows.map((r) => r.n)).toEqual([1, 2]);
    await reopened.close();
  });
});

describe('rows by prepared statements', () => {
  it('read back as the model layer reads them, and write what changed as `save` would', async () => {
    const { LiveSession, Workshop } = db.models;
    // The demo's workshop (PRODUCT.md's scenario), for the session's row to belong to.
    await seedDemo(db);
    const w = (await Workshop.findOne({ where: { title: DEMO_WORKSHOP_TITLE } }))!;
    const made = await LiveSession.create({
      id: 'rows-session',
      workshopId: w.id,
      joinCode: 'ROWS42',
      status: 'live',
      currentIndex: 0,
      timer: { status: 'idle', durationMs: 60_000, remainingMs: 60_000, endsAt: null },
      locked: false,
      revealed: true,
      message: null,
      runs: [{ itemId: 'a', startedAt: 1, endedAt: null }],
      version: 1,
      startedAt: new Date('2026-12-03T09:00:00.123Z'),
      endedAt: null,
    });
    const byModel = await LiveSession.findByPk(made.id);
    const [row] = await db.read<Record<string, unknown>>('SELECT * FROM live_sessions WHERE id = ?', [made.id]);
    const byStatement = instanceOf(LiveSession, row!);
    expect(byStatement.get({ plain: true })).toEqual(byModel!.get({ plain: true }));
    expect(byStatement.changed()).toBe(false);

    // Changed by a transaction as a live command changes it: plain columns, a JSON column, a date, a boolean.
    await db.writeTx(async (t) => {
      const [inTx] = await db.raw(t).all<Record<string, unknown>>('SELECT * FROM live_sessions WHERE id = ?', [made.id]);
      const s = instanceOf(LiveSession, inTx!);
      s.version += 1;
      s.status = 'ended';
      s.locked = true;
      s.endedAt = new Date('2026-12-03T10:30:00.456Z');
      s.set('runs', [{ itemId: 'a', startedAt: 1, endedAt: 2 }]);
      s.changed('runs', true);
      await saveChanged(db.raw(t), s);
      expect(s.changed()).toBe(false);
    });
    const after = (await LiveSession.findByPk(made.id))!;
    expect(after.get({ plain: true })).toMatchObject({
      version: 2,
      status: 'ended',
      locked: true,
      revealed: true,
      endedAt: new Date('2026-12-03T10:30:00.456Z'),
      runs: [{ itemId: 'a', startedAt: 1, endedAt: 2 }],
      startedAt: new Date('2026-12-03T09:00:00.123Z'),
    });
    expect(after.updatedAt.getTime()).toBeGreaterThanOrEqual(byModel!.updatedAt.getTime());
    // Nothing changed, nothing written.
    await db.writeTx(async (t) => {
      const [inTx] = await db.raw(t).all<Record<string, unknown>>('SELECT * FROM live_sessions WHERE id = ?', [made.id]);
      await saveChanged(db.raw(t), instanceOf(LiveSession, inTx!));
    });
    expect((await LiveSession.findByPk(made.id))!.updatedAt).toEqual(after.updatedAt);
  });
});
