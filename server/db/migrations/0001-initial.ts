import { DataTypes, type QueryInterface } from 'sequelize';

/** Accounts, settings, workshops with their agenda, memberships, invitations and password resets. */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  const ts = {
    createdAt: { type: DataTypes.DATE, allowNull: false },
    updatedAt: { type: DataTypes.DATE, allowNull: false },
  };
  await qi.createTable('users', {
    id: { type: DataTypes.STRING(36), primaryKey: true },
    email: { type: DataTypes.STRING(254), allowNull: false, unique: true },
    name: { type: DataTypes.STRING(80), allowNull: false },
    passwordHash: { type: DataTypes.STRING(100), allowNull: false },
    role: { type: DataTypes.STRING(20), allowNull: false },
    disabled: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    tokenVersion: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    ...ts,
  });
  await qi.createTable('settings', {
    key: { type: DataTypes.STRING(60), primaryKey: true },
    value: { type: DataTypes.TEXT, allowNull: false },
    ...ts,
  });
  await qi.createTable('workshops', {
    id: { type: DataTypes.STRING(36), primaryKey: true },
    ownerId: { type: DataTypes.STRING(36), allowNull: false, references: { model: 'users', key: 'id' } },
    title: { type: DataTypes.STRING(120), allowNull: false },
    objective: { type: DataTypes.TEXT, allowNull: false },
    persona: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
    date: { type: DataTypes.STRING(10), allowNull: false },
    window: { type: DataTypes.JSON, allowNull: false },
    venueNotes: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
    headcount: { type: DataTypes.INTEGER, allowNull: false },
    teamCount: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 3 },
    roomCapacity: { type: DataTypes.INTEGER, allowNull: true },
    consentText: { type: DataTypes.TEXT, allowNull: false },
    rules: { type: DataTypes.JSON, allowNull: false },
    packed: { type: DataTypes.JSON, allowNull: false },
    ...ts,
  });
  await qi.addIndex('workshops', ['ownerId']);
  await qi.createTable('agenda_items', {
    id: { type: DataTypes.STRING(64), primaryKey: true },
    workshopId: {
      type: DataTypes.STRING(36),
      allowNull: false,
      references: { model: 'workshops', key: 'id' },
      onDelete: 'CASCADE',
    },
    position: { type: DataTypes.INTEGER, allowNull: false },
    type: { type: DataTypes.STRING(30), allowNull: false },
    phase: { type: DataTypes.STRING(20), allowNull: false },
    title: { type: DataTypes.STRING(120), allowNull: false },
    timeboxMin: { type: DataTypes.INTEGER, allowNull: false },
    minTimeboxMin: { type: DataTypes.INTEGER, allowNull: false },
    prompt: { type: DataTypes.TEXT, allowNull: false },
    settings: { type: DataTypes.JSON, allowNull: false },
    ...ts,
  });
  await qi.addIndex('agenda_items', ['workshopId', 'position']);
  await qi.createTable('memberships', {
    id: { type: DataTypes.STRING(36), primaryKey: true },
    workshopId: {
      type: DataTypes.STRING(36),
      allowNull: false,
      references: { model: 'workshops', key: 'id' },
      onDelete: 'CASCADE',
    },
    userId: {
      type: DataTypes.STRING(36),
      allowNull: false,
      references: { model: 'users', key: 'id' },
      onDelete: 'CASCADE',
    },
    role: { type: DataTypes.STRING(20), allowNull: false },
    ...ts,
  });
  await qi.addIndex('memberships', ['workshopId', 'userId'], { unique: true });
  await qi.createTable('invitations', {
    id: { type: DataTypes.STRING(36), primaryKey: true },
    workshopId: {
      type: DataTypes.STRING(36),
      allowNull: false,
      references: { model: 'workshops', key: 'id' },
      onDelete: 'CASCADE',
    },
    email: { type: DataTypes.STRING(254), allowNull: false },
    role: { type: DataTypes.STRING(20), allowNull: false },
    tokenHash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
    invitedById: { type: DataTypes.STRING(36), allowNull: false },
    acceptedAt: { type: DataTypes.DATE, allowNull: true },
    expiresAt: { type: DataTypes.DATE, allowNull: false },
    ...ts,
  });
  await qi.createTable('password_resets', {
    id: { type: DataTypes.STRING(36), primaryKey: true },
    userId: {
      type: DataTypes.STRING(36),
      allowNull: false,
      references: { model: 'users', key: 'id' },
      onDelete: 'CASCADE',
    },
    tokenHash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
    usedAt: { type: DataTypes.DATE, allowNull: true },
    expiresAt: { type: DataTypes.DATE, allowNull: false },
    ...ts,
  });
}

/** Drops what `up` made, in reverse order. */
export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  for (const t of ['password_resets', 'invitations', 'memberships', 'agenda_items', 'workshops', 'settings', 'users']) {
    await qi.dropTable(t);
  }
}
