import { Sequelize, Transaction } from 'sequelize';
import { Umzug, SequelizeStorage } from 'umzug';
import sqlite3 from 'sqlite3';
import fs from 'node:fs';
import path from 'node:path';
import { performance } from 'node:perf_hooks';
import { defineModels, type Models } from './models';
import * as m0001 from './migrations/0001-initial';
import * as m0002 from './migrations/0002-live';
import * as m0003 from './migrations/0003-teams';
import * as m0004 from './migrations/0004-activities';
import * as m0005 from './migrations/0005-voting';
import * as m0006 from './migrations/0006-retention';
import * as m0007 from './migrations/0007-session-kind';
import * as m0008 from './migrations/0008-pinned-items';
import * as m0009 from './migrations/0009-team-history';
import * as m0010 from './migrations/0010-locales';

/** Versioned migrations, in order; add a file and a line here for each schema change. */
/**
 * A date as Sequelize writes a DATE column for SQLite (UTC, `2026-12-01 10:00:00.000 +00:00`), for the prepared
 * statements beside the model layer (dots, joins, last-seen times), so the model reads their rows back alike.
 * Made by hand: the model layer's own conversion goes through a date library on every write.
 */
export function sqliteDate(at: Date): string {
  return at.toISOString().replace('T', ' ').replace('Z', ' +00:00');
}

export const MIGRATIONS = [
  { name: '0001-initial', ...m0001 },
  { name: '0002-live', ...m0002 },
  { name: '0003-teams', ...m0003 },
  { name: '0004-activities', ...m0004 },
  { name: '0005-voting', ...m0005 },
  { name: '0006-retention', ...m0006 },
  { name: '0007-session-kind', ...m0007 },
  { name: '0008-pinned-items', ...m0008 },
  { name: '0009-team-history', ...m0009 },
  { name: '0010-locales', ...m0010 },
];

/** An open Cairn database: Sequelize, its models and a serialised writer. */
export interface Database {
  sequelize: Sequelize;
  models: Models;
  /** Name of the newest applied migration. */
  schemaVersion: string;
  /**
   * Runs `fn` in an IMMEDIATE write transaction, one at a time, so concurrent writers queue
   * in-process instead of meeting SQLITE_BUSY.
   */
  writeTx<T>(fn: (t: Transaction) => Promise<T>): Promise<T>;
  /**
   * Runs `fn` in the writer queue like writeTx, but lets it share one transaction with the other
   * batched writes waiting at that moment (group commit), for hot paths such as votes. `fn` must do
   * its checks before it writes and return a refusal as a value: anything thrown rolls the whole
   * batch back and every caller in it gets the error; `onRollback` lets a caller forget what it cached.
   * `windowMs`: how long a batch this write opens waits for others to join it (default BATCH_WINDOW_MS).
   */
  batchTx<T>(fn: (t: Transaction) => Promise<T>, onRollback?: () => void, windowMs?: number): Promise<T>;
  /**
   * Prepared statements on the writer connection of a writeTx/batchTx transaction, for the hottest
   * writes: no query building, no model instances, the statement compiled once.
   */
  raw(t: Transaction): RawStatements;
  /**
   * Prepared statements on the connection that reads outside transactions, for reads on a hot path (a
   * phone joining, its socket connecting): no query building, no model instances, and none of the
   * model layer's extra `PRAGMA table_info` a read. Sees what is committed.
   */
  read<R>(sql: string, params: unknown[]): Promise<R[]>;
  /**
   * Runs `fn` in transaction `t` after everything else in it and before its commit: a group commit
   * collects its writes in memory and stores them here as a few multi-row statements. If `fn` throws,
   * the transaction (the whole batch) rolls back.
   */
  beforeCommit(t: Transaction, fn: () => Promise<void>): void;
  /**
   * Calls `fn` when a group commit finds that another connection (another Cairn process on the same
   * file) committed since the last one: what a feature keeps in memory of the database is stale then.
   * It runs inside the group commit's transaction, before its writes, so they read afresh.
   */
  onExternalChange(fn: () => void): void;
  /**
   * Leaves no copy of deleted or overwritten rows in the files: copies the WAL into the database and
   * empties it, rewrites the database (VACUUM: no free pages that still hold old rows), and empties
   * the WAL again. Runs in the writer queue, alone.
   */
  scrub(): Promise<void>;
  close(): Promise<void>;
}

/** Prepared statements on the writer connection (positional `?` parameters). */
export interface RawStatements {
  all<R>(sql: string, params: unknown[]): Promise<R[]>;
  run(sql: string, params: unknown[]): Promise<void>;
  /** Runs a statement whose text varies (a multi-row insert of some number of rows) without keeping it prepared. */
  once(sql: string, params: unknown[]): Promise<void>;
}

/**
 * Makes the database file readable by its owner only (mode 600, like the signing secret), creating it
 * empty if needed. SQLite creates a new database 644, and gives its -wal and -shm files the database
 * file's mode (os_unix.c, findCreateFileMode and unixOpenSharedMemory, from memory), so a 600 file
 * first keeps all three private; files of an older install are narrowed too.
 */
function keepPrivate(storage: string): void {
  fs.mkdirSync(path.dirname(storage), { recursive: true, mode: 0o700 });
  fs.closeSync(fs.openSync(storage, 'a', 0o600));
  for (const file of [storage, `${storage}-wal`, `${storage}-shm`, `${storage}-journal`]) {
    if (fs.existsSync(file)) fs.chmodSync(file, 0o600);
  }
}

/** The most writes one group commit carries. */
const MAX_BATCH = 200;
/**
 * How long the first write of a group commit waits for others to join it. A transaction's own cost
 * (begin, the change check, commit, the statements' compilation) is most of a lone dot's; on an idle
 * server a room's votes would otherwise each get one, and the CPU a vote costs would grow as the
 * server has more of it to spare. A few milliseconds more on an acknowledgement, none on a solo write.
 */
const BATCH_WINDOW_MS = 8;

/**
 * Opens (creating if needed) the SQLite file, applies pending migrations and defines the models.
 * @example const db = await openDatabase('data/cairn.sqlite')
 */
export async function openDatabase(storage: string): Promise<Database> {
  if (storage !== ':memory:' && !storage.startsWith('file:')) keepPrivate(storage);
  const sequelize = new Sequelize({
    dialect: 'sqlite',
    dialectModule: sqlite3,
    storage,
    logging: false,
    transactionType: Transaction.TYPES.IMMEDIATE,
  });
  // Sequelize opens a fresh SQLite connection for every transaction and closes it after. Since
  // writeTx runs one transaction at a time, they all share one long-lived writer connection
  // instead (opening one costs milliseconds, which a burst of votes cannot spare).
  type Conn = sqlite3.Database & { __cairn?: boolean; uuid?: string };
  const cm = sequelize.connectionManager as unknown as {
    getConnection: (o?: { uuid?: string }) => Promise<Conn>;
    releaseConnection: (c: Conn, force?: boolean) => void;
  };
  const getConnection = cm.getConnection.bind(cm);
  const releaseConnection = cm.releaseConnection.bind(cm);
  let writer: Conn | null = null;
  // Prepared statements of the writer connection (see `raw`), compiled once each.
  const statements = new Map<string, sqlite3.Statement>();
  const prepare = (conn: Conn) => {
    if (!conn.__cairn) {
      conn.configure('busyTimeout', 10_000);
      // Per connection: in WAL mode NORMAL syncs at checkpoints, not at every commit; a killed
      // process loses nothing committed (only a power cut can lose the last transactions).
      conn.run('PRAGMA synchronous=NORMAL');
      // Deleted rows are overwritten with zeros, not left in free space (personal data must go from the file).
      conn.run('PRAGMA secure_delete=ON');
      // A statement's own rollback journal (a group commit's multi-row upsert needs one) is kept in memory:
      // as a temporary file, every dot vote's batch wrote it through the kernel.
      conn.run('PRAGMA temp_store=MEMORY');
      conn.__cairn = true;
    }
    return conn;
  };
  cm.getConnection = async (o?: { uuid?: string }) => {
    if (o?.uuid && o.uuid !== 'default') {
      writer ??= prepare(await getConnection({ uuid: 'cairn-writer' }));
      return writer;
    }
    return prepare(await getConnection(o));
  };
  cm.releaseConnection = (c: Conn, force?: boolean) => {
    if (c === writer) return;
    releaseConnection(c, force);
  };
  // After a failed commit Sequelize closes the connection: start a fresh writer next time.
  const cmd = cm as unknown as { destroyConnection: (c: Conn) => Promise<void> };
  const destroyConnection = cmd.destroyConnection.bind(cm);
  cmd.destroyConnection = async (c: Conn) => {
    if (c === writer) {
      writer = null;
      for (const st of statements.values()) st.finalize();
      statements.clear();
    }
    await destroyConnection(c);
  };
  await sequelize.query('PRAGMA journal_mode=WAL');
  await sequelize.query('PRAGMA synchronous=NORMAL');
  await sequelize.query('PRAGMA foreign_keys=ON');
  await sequelize.query('PRAGMA secure_delete=ON');

  const umzug = new Umzug({
    migrations: MIGRATIONS.map((mig) => ({ name: mig.name, up: mig.up, down: mig.down })),
    context: sequelize.getQueryInterface(),
    storage: new SequelizeStorage({ sequelize, tableName: 'schema_migrations' }),
    logger: undefined,
  });
  await umzug.up();
  const executed = await umzug.executed();
  const schemaVersion = executed.at(-1)?.name ?? 'none';

  const models = defineModels(sequelize);
  // One queue of writers: solo transactions run alone; batched writes that wait next to each other
  // share one transaction. Only one transaction is open at a time, on the one writer connection.
  type Entry =
    | { solo: true; run: () => Promise<void> }
    | {
        solo: false;
        fn: (t: Transaction) => Promise<unknown>;
        resolve: (v: unknown) => void;
        reject: (e: unknown) => void;
        onRollback?: () => void;
        /** When it was queued (performance.now()). */
        at: number;
        /** How long a batch it opens waits for others. */
        windowMs: number;
      };
  const pending: Entry[] = [];
  const commitHooks = new WeakMap<Transaction, (() => Promise<void>)[]>();
  const runHooks = async (t: Transaction) => {
    const hooks = commitHooks.get(t);
    // A hook may add another (the last write of one feature can start another's).
    while (hooks && hooks.length > 0) await hooks.shift()!();
  };
  const externalListeners: (() => void)[] = [];
  // SQLite's data_version changes when another connection commits (never for this connection's own).
  let dataVersion: number | null = null;
  const checkExternal = async (t: Transaction) => {
    const [row] = await raw(t).all<{ data_version: number }>('PRAGMA data_version', []);
    const now = Number(row?.data_version);
    // The first check cannot tell: what was kept before it may have been read from an older file state.
    if (now !== dataVersion) for (const fn of externalListeners) fn();
    dataVersion = now;
  };
  /**
   * A group commit's transaction, begun and committed on the writer connection directly: the model
   * layer's transaction costs a few queries' worth of bookkeeping each (a captured stack, the query
   * builder), paid a hundred times a second in a burst of votes. `fn` still gets a Sequelize
   * transaction bound to the writer, so the model's queries and `raw` run inside it. Whatever fails,
   * the transaction is rolled back; a writer whose rollback fails too is closed and opened afresh.
   */
  const groupCommit = async (fn: (t: Transaction) => Promise<void>): Promise<void> => {
    const conn = (writer ??= prepare(await getConnection({ uuid: 'cairn-writer' })));
    const exec = (sql: string) => new Promise<void>((resolve, reject) => conn.exec(sql, (err: Error | null) => (err ? reject(err) : resolve())));
    const t = new Transaction(sequelize, { type: Transaction.TYPES.IMMEDIATE });
    const handle = t as unknown as { id: string; connection: Conn; finished?: string; _afterCommitHooks: ((t: Transaction) => unknown)[] };
    handle.connection = conn;
    conn.uuid = handle.id;
    try {
      await exec('BEGIN IMMEDIATE');
      try {
        await fn(t);
        await exec('COMMIT');
      } catch (err) {
        handle.finished = 'rollback';
        await exec('ROLLBACK').catch(async (rollbackErr: Error) => {
          // SQLite may have rolled back by itself already (no transaction left is fine); anything else leaves the connection in doubt.
          if (/no transaction is active/.test(rollbackErr.message)) return;
          await cmd.destroyConnection(conn).catch(() => undefined);
        });
        throw err;
      }
    } finally {
      conn.uuid = undefined;
    }
    handle.finished = 'commit';
    for (const hook of handle._afterCommitHooks) await hook(t);
  };
  let draining = false;
  const drain = async () => {
    if (draining) return;
    draining = true;
    try {
      while (pending.length > 0) {
        const head = pending[0]!;
        if (head.solo) {
          pending.shift();
          await head.run();
          continue;
        }
        const wait = head.at + head.windowMs - performance.now();
        if (wait > 0) await new Promise((resolve) => setTimeout(resolve, wait));
        const batch: Extract<Entry, { solo: false }>[] = [];
        while (batch.length < MAX_BATCH && pending.length > 0 && !pending[0]!.solo) batch.push(pending.shift() as Extract<Entry, { solo: false }>);
        const results: unknown[] = [];
        try {
          await groupCommit(async (t) => {
            await checkExternal(t);
            for (const item of batch) results.push(await item.fn(t));
            await runHooks(t);
          });
          batch.forEach((item, i) => item.resolve(results[i]));
        } catch (err) {
          for (const item of batch) {
            item.onRollback?.();
            item.reject(err);
          }
        }
      }
    } finally {
      draining = false;
    }
  };
  const writeTx = <T>(fn: (t: Transaction) => Promise<T>): Promise<T> =>
    new Promise<T>((resolve, reject) => {
      pending.push({
        solo: true,
        run: () =>
          sequelize
            .transaction({ type: Transaction.TYPES.IMMEDIATE }, async (t) => {
              const result = await fn(t);
              await runHooks(t);
              return result;
            })
            .then(resolve, reject),
      });
      void drain();
    });
  const batchTx = <T>(fn: (t: Transaction) => Promise<T>, onRollback?: () => void, windowMs = BATCH_WINDOW_MS): Promise<T> =>
    new Promise<T>((resolve, reject) => {
      pending.push({ solo: false, fn, resolve: resolve as (v: unknown) => void, reject, onRollback, at: performance.now(), windowMs });
      void drain();
    });
  const raw = (t: Transaction): RawStatements => {
    const conn = (t as unknown as { connection: Conn }).connection;
    if (conn !== writer) throw new Error('raw statements run on the writer connection only');
    const statement = (sql: string) => {
      let st = statements.get(sql);
      if (!st) {
        st = conn.prepare(sql);
        statements.set(sql, st);
      }
      return st;
    };
    return {
      all: <R>(sql: string, params: unknown[]) =>
        new Promise<R[]>((resolve, reject) => statement(sql).all(params, (err: Error | null, rows: R[]) => (err ? reject(err) : resolve(rows)))),
      run: (sql: string, params: unknown[]) =>
        new Promise<void>((resolve, reject) => statement(sql).run(params, (err: Error | null) => (err ? reject(err) : resolve()))),
      once: (sql: string, params: unknown[]) =>
        new Promise<void>((resolve, reject) => conn.run(sql, params, (err: Error | null) => (err ? reject(err) : resolve()))),
    };
  };
  // Prepared statements of the reading connection (see `read`), compiled once each.
  const readStatements = new Map<string, sqlite3.Statement>();
  let reader: Conn | null = null;
  const read = async <R>(sql: string, params: unknown[]): Promise<R[]> => {
    reader ??= await cm.getConnection();
    let st = readStatements.get(sql);
    if (!st) {
      st = reader.prepare(sql);
      readStatements.set(sql, st);
    }
    const statement = st;
    return new Promise<R[]>((resolve, reject) => statement.all(params, (err: Error | null, rows: R[]) => (err ? reject(err) : resolve(rows))));
  };
  const scrub = () =>
    new Promise<void>((resolve, reject) => {
      pending.push({
        solo: true,
        run: async () => {
          try {
            const conn = (writer ??= prepare(await getConnection({ uuid: 'cairn-writer' })));
            // VACUUM refuses to run while statements of its connection are open: they are prepared again when next used.
            for (const st of statements.values()) await new Promise<void>((r) => st.finalize(() => r()));
            statements.clear();
            const all = (sql: string) =>
              new Promise<Record<string, number>[]>((res, rej) => conn.all(sql, [], (err: Error | null, rows: Record<string, number>[]) => (err ? rej(err) : res(rows))));
            const checkpoint = async () => {
              // TRUNCATE waits (busy handler) for readers of older snapshots; busy=1 means it could not finish yet.
              for (let tries = 0; tries < 50; tries++) {
                const [row] = await all('PRAGMA wal_checkpoint(TRUNCATE)');
                if (!row?.busy) return;
                await new Promise((r) => setTimeout(r, 20));
              }
              throw new Error('the write-ahead log could not be emptied');
            };
            await checkpoint();
            await all('VACUUM');
            await checkpoint();
            resolve();
          } catch (err) {
            reject(err);
          }
        },
      });
      void drain();
    });
  const beforeCommit = (t: Transaction, fn: () => Promise<void>) => {
    const hooks = commitHooks.get(t);
    if (hooks) hooks.push(fn);
    else commitHooks.set(t, [fn]);
  };
  return {
    sequelize,
    models,
    schemaVersion,
    writeTx,
    batchTx,
    raw,
    read,
    beforeCommit,
    scrub,
    onExternalChange: (fn: () => void) => {
      externalListeners.push(fn);
    },
    close: async () => {
      // Writes already queued finish first (their callers are waiting for the commit), for up to 5 s.
      for (let waited = 0; (draining || pending.length > 0) && waited < 5_000; waited += 10) await new Promise((r) => setTimeout(r, 10));
      for (const st of statements.values()) await new Promise<void>((resolve) => st.finalize(() => resolve()));
      statements.clear();
      for (const st of readStatements.values()) await new Promise<void>((resolve) => st.finalize(() => resolve()));
      readStatements.clear();
      reader = null;
      await sequelize.close();
    },
  };
}
