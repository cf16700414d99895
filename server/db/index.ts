import { Sequelize, Transaction } from 'sequelize';
import { Umzug, SequelizeStorage } from 'umzug';
import sqlite3 from 'sqlite3';
import { defineModels, type Models } from './models';
import * as m0001 from './migrations/0001-initial';
import * as m0002 from './migrations/0002-live';
import * as m0003 from './migrations/0003-teams';

/** Versioned migrations, in order; add a file and a line here for each schema change. */
export const MIGRATIONS = [
  { name: '0001-initial', ...m0001 },
  { name: '0002-live', ...m0002 },
  { name: '0003-teams', ...m0003 },
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
  close(): Promise<void>;
}

/**
 * Opens (creating if needed) the SQLite file, applies pending migrations and defines the models.
 * @example const db = await openDatabase('data/cairn.sqlite')
 */
export async function openDatabase(storage: string): Promise<Database> {
  const sequelize = new Sequelize({
    dialect: 'sqlite',
    dialectModule: sqlite3,
    storage,
    logging: false,
    transactionType: Transaction.TYPES.IMMEDIATE,
  });
  // Every connection (Sequelize opens one per transaction on SQLite) waits for a lock instead of failing.
  const cm = sequelize.connectionManager as unknown as {
    getConnection: (o?: unknown) => Promise<sqlite3.Database & { __cairn?: boolean }>;
  };
  const getConnection = cm.getConnection.bind(cm);
  cm.getConnection = async (o?: unknown) => {
    const conn = await getConnection(o);
    if (!conn.__cairn) {
      conn.configure('busyTimeout', 10_000);
      conn.__cairn = true;
    }
    return conn;
  };
  await sequelize.query('PRAGMA journal_mode=WAL');
  await sequelize.query('PRAGMA synchronous=NORMAL');
  await sequelize.query('PRAGMA foreign_keys=ON');

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
  let queue: Promise<unknown> = Promise.resolve();
  const writeTx = <T>(fn: (t: Transaction) => Promise<T>): Promise<T> => {
    const run = queue.then(() => sequelize.transaction({ type: Transaction.TYPES.IMMEDIATE }, fn));
    queue = run.catch(() => undefined);
    return run;
  };
  return {
    sequelize,
    models,
    schemaVersion,
    writeTx,
    close: () => sequelize.close(),
  };
}
