import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * Every live session is a rehearsal or the day (sessions from before count as the day), and keeps the
 * timeboxes its run was cut to (agenda item id → minutes) apart from the stored plan, with the
 * timeboxes before the last cut, for its undo.
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.addColumn('live_sessions', 'kind', { type: DataTypes.STRING(10), allowNull: false, defaultValue: 'day' });
  await qi.addColumn('live_sessions', 'timeboxes', { type: DataTypes.JSON, allowNull: false, defaultValue: '{}' });
  await qi.addColumn('live_sessions', 'timeboxesBefore', { type: DataTypes.JSON, allowNull: true });
}

/** Drops the three columns. */
export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.removeColumn('live_sessions', 'timeboxesBefore');
  await qi.removeColumn('live_sessions', 'timeboxes');
  await qi.removeColumn('live_sessions', 'kind');
}
