import { DataTypes, type QueryInterface } from 'sequelize';

/** An agenda item may be pinned to a clock time (`HH:MM`, e.g. lunch when the catering arrives); `null` runs it after the item before. */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.addColumn('agenda_items', 'pinnedAt', { type: DataTypes.STRING(5), allowNull: true });
}

/** Drops the column. */
export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.removeColumn('agenda_items', 'pinnedAt');
}
