import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * Languages of the participant's screens: each participant's (from the phone when joining, for the
 * e-mail with the report) and the projector's, which the facilitator picks for a live session.
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.addColumn('participants', 'locale', { type: DataTypes.STRING(5), allowNull: false, defaultValue: 'en' });
  await qi.addColumn('live_sessions', 'projectorLocale', { type: DataTypes.STRING(5), allowNull: false, defaultValue: 'en' });
}

/** Drops both columns (everything reads as English again). */
export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.removeColumn('participants', 'locale');
  await qi.removeColumn('live_sessions', 'projectorLocale');
}
