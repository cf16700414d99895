import type { Model, ModelStatic } from 'sequelize';
import { sqliteDate, type RawStatements } from './index';

/** How a column is kept in SQLite and given to the code, by the model attribute's type. */
type Kind = 'json' | 'date' | 'boolean' | 'plain';

function kindOf(type: unknown): Kind {
  const key = (type as { key?: string } | undefined)?.key;
  if (key === 'JSON') return 'json';
  if (key === 'DATE') return 'date';
  if (key === 'BOOLEAN') return 'boolean';
  return 'plain';
}

type Column = { key: string; field: string; kind: Kind };
const columnsByModel = new WeakMap<object, Column[]>();

/** The attributes of a model: property name, column name and kind (worked out once per model). */
function columnsOf(model: ModelStatic<Model>): Column[] {
  let columns = columnsByModel.get(model);
  if (!columns) {
    columns = Object.entries(model.getAttributes()).map(([key, attr]) => ({ key, field: attr.field ?? key, kind: kindOf(attr.type) }));
    columnsByModel.set(model, columns);
  }
  return columns;
}

/**
 * A model instance from a row read by a prepared statement, its columns converted as the model layer
 * converts them when it reads from SQLite (JSON parsed, dates as `Date`, booleans as `true`/`false`), with
 * nothing marked changed: for the hottest rows, which the model layer reads with a `PRAGMA table_info`
 * before every query.
 * @example instanceOf(LiveSession, (await db.read('SELECT * FROM live_sessions WHERE id = ?', [id]))[0])
 */
export function instanceOf<M extends Model>(model: ModelStatic<M>, row: Record<string, unknown>): M {
  const values: Record<string, unknown> = {};
  for (const { key, field, kind } of columnsOf(model as ModelStatic<Model>)) {
    const v = row[field];
    if (v === null || v === undefined) values[key] = null;
    else if (kind === 'json') values[key] = typeof v === 'string' ? JSON.parse(v) : v;
    else if (kind === 'date') values[key] = new Date(v as string);
    else if (kind === 'boolean') values[key] = v === true || v === 1 || v === '1' || v === 'true';
    else values[key] = v;
  }
  return model.build(values as M['_creationAttributes'], { isNewRecord: false, raw: true });
}

/** A value as the model layer writes it to SQLite. */
function toSqlite(kind: Kind, v: unknown): unknown {
  if (v === null || v === undefined) return null;
  if (kind === 'json') return JSON.stringify(v);
  if (kind === 'date') return sqliteDate(v instanceof Date ? v : new Date(v as string));
  if (kind === 'boolean') return v ? 1 : 0;
  return v;
}

/**
 * Writes what changed on an instance read by {@link instanceOf} with a prepared statement, as `save`
 * would (its `updatedAt` too, when the model keeps one), and marks it saved. Nothing is written when
 * nothing changed.
 */
export async function saveChanged(sql: RawStatements, instance: Model): Promise<void> {
  const model = instance.constructor as ModelStatic<Model>;
  const changed = instance.changed();
  if (!changed || changed.length === 0) return;
  const columns = columnsOf(model);
  const updatedAt = model.getAttributes().updatedAt ? 'updatedAt' : null;
  if (updatedAt && !changed.includes(updatedAt)) {
    instance.set(updatedAt, new Date(), { raw: true });
    changed.push(updatedAt);
  }
  const set = columns.filter((c) => changed.includes(c.key));
  const id = columns.find((c) => model.primaryKeyAttributes.includes(c.key))!;
  await sql.run(`UPDATE ${model.tableName} SET ${set.map((c) => `${c.field} = ?`).join(', ')} WHERE ${id.field} = ?`, [
    ...set.map((c) => toSqlite(c.kind, instance.get(c.key))),
    instance.get(id.key),
  ]);
  for (const key of changed) instance.changed(key as never, false);
}
