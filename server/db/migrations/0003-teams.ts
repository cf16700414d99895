import { DataTypes, type QueryInterface } from 'sequelize';

/** Teams of a live session; participants.teamId points at one. */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.createTable('teams', {
    id: { type: DataTypes.STRING(36), primaryKey: true },
    sessionId: {
      type: DataTypes.STRING(36),
      allowNull: false,
      references: { model: 'live_sessions', key: 'id' },
      onDelete: 'CASCADE',
    },
    name: { type: DataTypes.STRING(60), allowNull: false },
    challenge: { type: DataTypes.TEXT, allowNull: true },
    position: { type: DataTypes.INTEGER, allowNull: false },
    createdAt: { type: DataTypes.DATE, allowNull: false },
    updatedAt: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('teams', ['sessionId', 'position']);
}

/** Drops the teams table. */
export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.dropTable('teams');
}
