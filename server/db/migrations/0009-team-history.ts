import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * Teams an activity ran with stay when teams are formed again: they are retired (`retiredAt`) instead of
 * deleted, so notes filed under them keep their team's name in the results.
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.addColumn('teams', 'retiredAt', { type: DataTypes.DATE, allowNull: true });
}

/** Drops the column (retired teams then read as current ones). */
export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.removeColumn('teams', 'retiredAt');
}
