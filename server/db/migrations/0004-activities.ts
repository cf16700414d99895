import { DataTypes, type QueryInterface } from 'sequelize';

const session = {
  type: DataTypes.STRING(36),
  allowNull: false,
  references: { model: 'live_sessions', key: 'id' },
  onDelete: 'CASCADE',
};

/**
 * What the activities of a live session keep besides submissions: affinity themes, notes and
 * themes promoted to a later vote, photos (sketches, storyboard frames), the state of each
 * activity (the round of rotating pairs and its roster, the order of storyboard frames), and which
 * note a duplicate was merged into.
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.createTable('themes', {
    id: { type: DataTypes.STRING(36), primaryKey: true },
    sessionId: session,
    itemId: { type: DataTypes.STRING(64), allowNull: false },
    name: { type: DataTypes.STRING(80), allowNull: false },
    position: { type: DataTypes.INTEGER, allowNull: false },
    createdAt: { type: DataTypes.DATE, allowNull: false },
    updatedAt: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('themes', ['sessionId', 'itemId']);

  await qi.createTable('promotions', {
    id: { type: DataTypes.STRING(36), primaryKey: true },
    sessionId: session,
    itemId: { type: DataTypes.STRING(64), allowNull: false },
    sourceKind: { type: DataTypes.STRING(10), allowNull: false },
    sourceId: { type: DataTypes.STRING(36), allowNull: false },
    text: { type: DataTypes.TEXT, allowNull: false },
    position: { type: DataTypes.INTEGER, allowNull: false },
    createdAt: { type: DataTypes.DATE, allowNull: false },
  });
  // A note or theme is promoted once; promoting it again finds the first promotion.
  await qi.addIndex('promotions', ['sessionId', 'sourceKind', 'sourceId'], { unique: true });

  await qi.createTable('photos', {
    id: { type: DataTypes.STRING(36), primaryKey: true },
    sessionId: session,
    itemId: { type: DataTypes.STRING(64), allowNull: false },
    participantId: {
      type: DataTypes.STRING(36),
      allowNull: false,
      references: { model: 'participants', key: 'id' },
      onDelete: 'CASCADE',
    },
    clientId: { type: DataTypes.STRING(64), allowNull: false },
    storageKey: { type: DataTypes.STRING(64), allowNull: false, unique: true },
    width: { type: DataTypes.INTEGER, allowNull: false },
    height: { type: DataTypes.INTEGER, allowNull: false },
    bytes: { type: DataTypes.INTEGER, allowNull: false },
    showsPeople: { type: DataTypes.BOOLEAN, allowNull: false },
    peopleConsent: { type: DataTypes.BOOLEAN, allowNull: false },
    createdAt: { type: DataTypes.DATE, allowNull: false },
  });
  // The photo's submission has the same (participantId, clientId), so a retried upload lands once.
  await qi.addIndex('photos', ['participantId', 'clientId'], { unique: true });
  await qi.addIndex('photos', ['sessionId', 'itemId']);

  await qi.createTable('activity_states', {
    id: { type: DataTypes.STRING(36), primaryKey: true },
    sessionId: session,
    itemId: { type: DataTypes.STRING(64), allowNull: false },
    round: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    roster: { type: DataTypes.JSON, allowNull: true },
    frameOrders: { type: DataTypes.JSON, allowNull: false },
    createdAt: { type: DataTypes.DATE, allowNull: false },
    updatedAt: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('activity_states', ['sessionId', 'itemId'], { unique: true });

  await qi.addColumn('submissions', 'mergedIntoId', { type: DataTypes.STRING(36), allowNull: true });
}

/** Drops what `up` made, in reverse order. */
export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.removeColumn('submissions', 'mergedIntoId');
  for (const t of ['activity_states', 'photos', 'promotions', 'themes']) await qi.dropTable(t);
}
