import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * Retention of a workshop's personal data: days after the last live session ended before names,
 * photos and addresses are deleted automatically (`null`: kept until the facilitator deletes them),
 * and when they were deleted.
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.addColumn('workshops', 'retentionDays', { type: DataTypes.INTEGER, allowNull: true });
  await qi.addColumn('workshops', 'personalDataDeletedAt', { type: DataTypes.DATE, allowNull: true });
}

/** Drops the two columns. */
export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.removeColumn('workshops', 'personalDataDeletedAt');
  await qi.removeColumn('workshops', 'retentionDays');
}
