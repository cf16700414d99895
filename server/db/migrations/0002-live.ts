import { DataTypes, type QueryInterface } from 'sequelize';

/** Live sessions with their server-owned state, the participants who joined them, and their submissions. */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.createTable('live_sessions', {
    id: { type: DataTypes.STRING(36), primaryKey: true },
    workshopId: {
      type: DataTypes.STRING(36),
      allowNull: false,
      references: { model: 'workshops', key: 'id' },
      onDelete: 'CASCADE',
    },
    joinCode: { type: DataTypes.STRING(16), allowNull: false, unique: true },
    status: { type: DataTypes.STRING(10), allowNull: false },
    currentIndex: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    timer: { type: DataTypes.JSON, allowNull: false },
    locked: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    revealed: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    message: { type: DataTypes.JSON, allowNull: true },
    runs: { type: DataTypes.JSON, allowNull: false },
    version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
    startedAt: { type: DataTypes.DATE, allowNull: false },
    endedAt: { type: DataTypes.DATE, allowNull: true },
    createdAt: { type: DataTypes.DATE, allowNull: false },
    updatedAt: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('live_sessions', ['workshopId', 'status']);

  await qi.createTable('participants', {
    id: { type: DataTypes.STRING(36), primaryKey: true },
    sessionId: {
      type: DataTypes.STRING(36),
      allowNull: false,
      references: { model: 'live_sessions', key: 'id' },
      onDelete: 'CASCADE',
    },
    deviceId: { type: DataTypes.STRING(64), allowNull: false },
    displayName: { type: DataTypes.STRING(40), allowNull: false },
    photoConsent: { type: DataTypes.BOOLEAN, allowNull: false },
    teamId: { type: DataTypes.STRING(64), allowNull: true },
    email: { type: DataTypes.STRING(254), allowNull: true },
    joinedAt: { type: DataTypes.DATE, allowNull: false },
    lastSeenAt: { type: DataTypes.DATE, allowNull: false },
  });
  // The same phone rejoining finds its participant again instead of making a second one.
  await qi.addIndex('participants', ['sessionId', 'deviceId'], { unique: true });

  await qi.createTable('submissions', {
    id: { type: DataTypes.STRING(36), primaryKey: true },
    sessionId: {
      type: DataTypes.STRING(36),
      allowNull: false,
      references: { model: 'live_sessions', key: 'id' },
      onDelete: 'CASCADE',
    },
    itemId: { type: DataTypes.STRING(64), allowNull: false },
    participantId: {
      type: DataTypes.STRING(36),
      allowNull: false,
      references: { model: 'participants', key: 'id' },
      onDelete: 'CASCADE',
    },
    clientId: { type: DataTypes.STRING(64), allowNull: false },
    kind: { type: DataTypes.STRING(20), allowNull: false },
    part: { type: DataTypes.STRING(30), allowNull: true },
    text: { type: DataTypes.TEXT, allowNull: false },
    fields: { type: DataTypes.JSON, allowNull: true },
    teamId: { type: DataTypes.STRING(64), allowNull: true },
    hidden: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    themeId: { type: DataTypes.STRING(36), allowNull: true },
    createdAt: { type: DataTypes.DATE, allowNull: false },
  });
  // A submission retried after a lost acknowledgement is stored exactly once.
  await qi.addIndex('submissions', ['participantId', 'clientId'], { unique: true });
  await qi.addIndex('submissions', ['sessionId', 'itemId']);
}

/** Drops what `up` made, in reverse order. */
export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  for (const t of ['submissions', 'participants', 'live_sessions']) await qi.dropTable(t);
}
