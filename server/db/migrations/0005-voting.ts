import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * Votes of a live session (one per voting agenda item), the dots and rankings participants cast,
 * and the receipts that make a retried vote command land once.
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.createTable('votes', {
    id: { type: DataTypes.STRING(36), primaryKey: true },
    sessionId: {
      type: DataTypes.STRING(36),
      allowNull: false,
      references: { model: 'live_sessions', key: 'id' },
      onDelete: 'CASCADE',
    },
    itemId: { type: DataTypes.STRING(64), allowNull: false },
    kind: { type: DataTypes.STRING(20), allowNull: false },
    status: { type: DataTypes.STRING(10), allowNull: false },
    options: { type: DataTypes.JSON, allowNull: false },
    rules: { type: DataTypes.JSON, allowNull: false },
    chosen: { type: DataTypes.JSON, allowNull: true },
    proposal: { type: DataTypes.JSON, allowNull: true },
    createdAt: { type: DataTypes.DATE, allowNull: false },
    updatedAt: { type: DataTypes.DATE, allowNull: false },
  });
  // One vote per agenda item of a session.
  await qi.addIndex('votes', ['sessionId', 'itemId'], { unique: true });

  await qi.createTable('vote_dots', {
    id: { type: DataTypes.STRING(36), primaryKey: true },
    voteId: { type: DataTypes.STRING(36), allowNull: false, references: { model: 'votes', key: 'id' }, onDelete: 'CASCADE' },
    participantId: {
      type: DataTypes.STRING(36),
      allowNull: false,
      references: { model: 'participants', key: 'id' },
      onDelete: 'CASCADE',
    },
    optionId: { type: DataTypes.STRING(64), allowNull: false },
    criterionId: { type: DataTypes.STRING(40), allowNull: false },
    count: { type: DataTypes.INTEGER, allowNull: false },
  });
  // A voter's dots on one option for one criterion are one row, counted up and down.
  await qi.addIndex('vote_dots', ['voteId', 'participantId', 'optionId', 'criterionId'], { unique: true });

  await qi.createTable('vote_rankings', {
    id: { type: DataTypes.STRING(36), primaryKey: true },
    voteId: { type: DataTypes.STRING(36), allowNull: false, references: { model: 'votes', key: 'id' }, onDelete: 'CASCADE' },
    participantId: {
      type: DataTypes.STRING(36),
      allowNull: false,
      references: { model: 'participants', key: 'id' },
      onDelete: 'CASCADE',
    },
    ranking: { type: DataTypes.JSON, allowNull: false },
    updatedAt: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('vote_rankings', ['voteId', 'participantId'], { unique: true });

  await qi.createTable('vote_receipts', {
    id: { type: DataTypes.STRING(36), primaryKey: true },
    participantId: {
      type: DataTypes.STRING(36),
      allowNull: false,
      references: { model: 'participants', key: 'id' },
      onDelete: 'CASCADE',
    },
    clientId: { type: DataTypes.STRING(64), allowNull: false },
    voteId: { type: DataTypes.STRING(36), allowNull: false, references: { model: 'votes', key: 'id' }, onDelete: 'CASCADE' },
    createdAt: { type: DataTypes.DATE, allowNull: false },
  });
  // A vote command retried after a lost acknowledgement is applied exactly once.
  await qi.addIndex('vote_receipts', ['participantId', 'clientId'], { unique: true });
}

/** Drops what `up` made, in reverse order. */
export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  for (const t of ['vote_receipts', 'vote_rankings', 'vote_dots', 'votes']) await qi.dropTable(t);
}
