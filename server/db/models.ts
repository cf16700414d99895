import type { Locale } from '../../shared/locales';
import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
  type ModelStatic,
} from 'sequelize';
import type { GlobalRole } from '../../shared/schemas/user';
import type { ActivitySettings } from '../../shared/schemas/agenda-item';
import type { DayWindow, RuleSettings } from '../../shared/schemas/day-window';
import type { ItemRun, SessionKind, SubmissionInput, TimerState } from '../../shared/schemas/live';
import type { TeamProposal, VoteKind, VoteOption, VoteRules, VoteStatus } from '../../shared/schemas/voting';

const timestamps = {
  createdAt: DataTypes.DATE,
  updatedAt: DataTypes.DATE,
};

/** An account row. */
export interface UserRow extends Model<InferAttributes<UserRow>, InferCreationAttributes<UserRow>> {
  id: string;
  email: string;
  name: string;
  passwordHash: string;
  role: GlobalRole;
  disabled: CreationOptional<boolean>;
  tokenVersion: CreationOptional<number>;
  createdAt: CreationOptional<Date>;
  updatedAt: CreationOptional<Date>;
}

/** A server-wide setting row (JSON value). */
export interface SettingRow extends Model<InferAttributes<SettingRow>, InferCreationAttributes<SettingRow>> {
  key: string;
  value: string;
  createdAt: CreationOptional<Date>;
  updatedAt: CreationOptional<Date>;
}

/** A workshop row (its brief; agenda items are rows of their own). */
export interface WorkshopRow extends Model<InferAttributes<WorkshopRow>, InferCreationAttributes<WorkshopRow>> {
  id: string;
  ownerId: string;
  title: string;
  objective: string;
  persona: string;
  date: string;
  window: DayWindow;
  venueNotes: string;
  headcount: number;
  teamCount: number;
  roomCapacity: number | null;
  consentText: string;
  rules: RuleSettings;
  packed: string[];
  /** Days after the last live session ended before personal data is deleted automatically; `null` for never. */
  retentionDays: CreationOptional<number | null>;
  /** When the workshop's names, photos and addresses were deleted. */
  personalDataDeletedAt: CreationOptional<Date | null>;
  createdAt: CreationOptional<Date>;
  updatedAt: CreationOptional<Date>;
}

/** An agenda item row, ordered by position within its workshop. */
export interface AgendaItemRow extends Model<InferAttributes<AgendaItemRow>, InferCreationAttributes<AgendaItemRow>> {
  id: string;
  workshopId: string;
  position: number;
  type: string;
  phase: string;
  title: string;
  timeboxMin: number;
  minTimeboxMin: number;
  prompt: string;
  settings: ActivitySettings;
  /** A clock time the item is pinned to (`HH:MM`), or null to follow the item before. */
  pinnedAt: CreationOptional<string | null>;
  createdAt: CreationOptional<Date>;
  updatedAt: CreationOptional<Date>;
}

/** A per-workshop role of an account (co-facilitator or observer). */
export interface MembershipRow extends Model<InferAttributes<MembershipRow>, InferCreationAttributes<MembershipRow>> {
  id: string;
  workshopId: string;
  userId: string;
  role: 'cofacilitator' | 'observer';
  createdAt: CreationOptional<Date>;
  updatedAt: CreationOptional<Date>;
}

/** An invitation by e-mail to a per-workshop role. */
export interface InvitationRow extends Model<InferAttributes<InvitationRow>, InferCreationAttributes<InvitationRow>> {
  id: string;
  workshopId: string;
  email: string;
  role: 'cofacilitator' | 'observer';
  tokenHash: string;
  invitedById: string;
  acceptedAt: Date | null;
  expiresAt: Date;
  createdAt: CreationOptional<Date>;
  updatedAt: CreationOptional<Date>;
}

/** A one-time password-reset token (stored hashed). */
export interface PasswordResetRow extends Model<InferAttributes<PasswordResetRow>, InferCreationAttributes<PasswordResetRow>> {
  id: string;
  userId: string;
  tokenHash: string;
  usedAt: Date | null;
  expiresAt: Date;
  createdAt: CreationOptional<Date>;
  updatedAt: CreationOptional<Date>;
}

/** A live session of a workshop: the state the server owns and every screen follows. */
export interface LiveSessionRow extends Model<InferAttributes<LiveSessionRow>, InferCreationAttributes<LiveSessionRow>> {
  id: string;
  workshopId: string;
  joinCode: string;
  status: 'live' | 'ended';
  /** A rehearsal or the day itself: results cover the day's sessions unless asked otherwise. */
  kind: CreationOptional<SessionKind>;
  /** The run's own timeboxes (agenda item id → minutes) where cuts shortened items for this session only. */
  timeboxes: CreationOptional<Record<string, number>>;
  /** The run's timeboxes before the last cut, to undo it; `null` when there is nothing to undo. */
  timeboxesBefore: CreationOptional<Record<string, number> | null>;
  currentIndex: number;
  timer: TimerState;
  locked: boolean;
  revealed: boolean;
  message: { id: string; text: string; sentAt: number } | null;
  runs: ItemRun[];
  version: number;
  startedAt: Date;
  endedAt: Date | null;
  /** The language the projector shows this session in, picked by a facilitator. */
  projectorLocale: CreationOptional<Locale>;
  createdAt: CreationOptional<Date>;
  updatedAt: CreationOptional<Date>;
}

/** A person in the room who joined a live session from a phone (one row per session and device). */
export interface ParticipantRow extends Model<InferAttributes<ParticipantRow>, InferCreationAttributes<ParticipantRow>> {
  id: string;
  sessionId: string;
  deviceId: string;
  displayName: string;
  photoConsent: boolean;
  teamId: string | null;
  email: string | null;
  /** The language of the participant's phone when they joined: the e-mail with the report speaks it. */
  locale: CreationOptional<Locale>;
  joinedAt: Date;
  lastSeenAt: Date;
}

/** A team of a live session. */
export interface TeamRow extends Model<InferAttributes<TeamRow>, InferCreationAttributes<TeamRow>> {
  id: string;
  sessionId: string;
  name: string;
  challenge: string | null;
  position: number;
  /** When teams were formed again and this one gave way (it stays, so earlier activities keep its name); `null` for a current team. */
  retiredAt: CreationOptional<Date | null>;
  createdAt: CreationOptional<Date>;
  updatedAt: CreationOptional<Date>;
}

/** A note, guided sentence or feedback a participant submitted to an agenda item of a live session. */
export interface SubmissionRow extends Model<InferAttributes<SubmissionRow>, InferCreationAttributes<SubmissionRow>> {
  id: string;
  sessionId: string;
  itemId: string;
  participantId: string;
  clientId: string;
  kind: SubmissionInput['kind'];
  part: string | null;
  text: string;
  fields: Record<string, string> | null;
  teamId: string | null;
  hidden: CreationOptional<boolean>;
  themeId: string | null;
  /** The note this duplicate was merged into (set by moderation; `null` for a note on its own). */
  mergedIntoId: CreationOptional<string | null>;
  createdAt: Date;
}

/** An affinity theme of one agenda item's notes, named by the facilitator. */
export interface ThemeRow extends Model<InferAttributes<ThemeRow>, InferCreationAttributes<ThemeRow>> {
  id: string;
  sessionId: string;
  itemId: string;
  name: string;
  position: number;
  createdAt: CreationOptional<Date>;
  updatedAt: CreationOptional<Date>;
}

/** A note or theme promoted to an option of a later vote, with its text as it was promoted. */
export interface PromotionRow extends Model<InferAttributes<PromotionRow>, InferCreationAttributes<PromotionRow>> {
  id: string;
  sessionId: string;
  itemId: string;
  sourceKind: 'note' | 'theme';
  sourceId: string;
  text: string;
  position: number;
  createdAt: Date;
}

/** A photo a participant took (a sketch, a storyboard frame); its files live under the upload folder by `storageKey`. */
export interface PhotoRow extends Model<InferAttributes<PhotoRow>, InferCreationAttributes<PhotoRow>> {
  id: string;
  sessionId: string;
  itemId: string;
  participantId: string;
  clientId: string;
  storageKey: string;
  width: number;
  height: number;
  bytes: number;
  showsPeople: boolean;
  peopleConsent: boolean;
  createdAt: Date;
}

/** What an activity of a live session keeps: the round of rotating pairs, who is paired, and the storyboards' frame order. */
export interface ActivityStateRow extends Model<InferAttributes<ActivityStateRow>, InferCreationAttributes<ActivityStateRow>> {
  id: string;
  sessionId: string;
  itemId: string;
  round: number;
  /** Participant ids in pairing order, fixed when the pairs were first drawn; `null` until then. */
  roster: string[] | null;
  /** Frame (submission) ids in story order, per team id. */
  frameOrders: Record<string, string[]>;
  createdAt: CreationOptional<Date>;
  updatedAt: CreationOptional<Date>;
}

/** A vote of a live session: one per voting agenda item, with its options, rules and where it stands. */
export interface VoteRow extends Model<InferAttributes<VoteRow>, InferCreationAttributes<VoteRow>> {
  id: string;
  sessionId: string;
  itemId: string;
  kind: VoteKind;
  status: VoteStatus;
  options: VoteOption[];
  rules: VoteRules;
  /** The options carried forward (top N with ties broken by the facilitator). */
  chosen: string[] | null;
  /** The last team proposal of a team sort. */
  proposal: TeamProposal | null;
  createdAt: CreationOptional<Date>;
  updatedAt: CreationOptional<Date>;
}

/** The dots one participant put on one option of a dot vote for one criterion. */
export interface VoteDotRow extends Model<InferAttributes<VoteDotRow>, InferCreationAttributes<VoteDotRow>> {
  id: string;
  voteId: string;
  participantId: string;
  optionId: string;
  criterionId: string;
  count: number;
}

/** One participant's order of the options of a preference vote or team sort. */
export interface VoteRankingRow extends Model<InferAttributes<VoteRankingRow>, InferCreationAttributes<VoteRankingRow>> {
  id: string;
  voteId: string;
  participantId: string;
  ranking: string[];
  updatedAt: Date;
}

/** A vote command already applied, by the phone's client id, so a retry is not applied twice. */
export interface VoteReceiptRow extends Model<InferAttributes<VoteReceiptRow>, InferCreationAttributes<VoteReceiptRow>> {
  id: string;
  participantId: string;
  clientId: string;
  voteId: string;
  createdAt: Date;
}

/** The models of one database, defined on its own Sequelize instance so tests can open several. */
export interface Models {
  User: ModelStatic<UserRow>;
  Setting: ModelStatic<SettingRow>;
  Workshop: ModelStatic<WorkshopRow>;
  AgendaItem: ModelStatic<AgendaItemRow>;
  Membership: ModelStatic<MembershipRow>;
  Invitation: ModelStatic<InvitationRow>;
  PasswordReset: ModelStatic<PasswordResetRow>;
  LiveSession: ModelStatic<LiveSessionRow>;
  Participant: ModelStatic<ParticipantRow>;
  Team: ModelStatic<TeamRow>;
  Submission: ModelStatic<SubmissionRow>;
  Theme: ModelStatic<ThemeRow>;
  Promotion: ModelStatic<PromotionRow>;
  Photo: ModelStatic<PhotoRow>;
  ActivityState: ModelStatic<ActivityStateRow>;
  Vote: ModelStatic<VoteRow>;
  VoteDot: ModelStatic<VoteDotRow>;
  VoteRanking: ModelStatic<VoteRankingRow>;
  VoteReceipt: ModelStatic<VoteReceiptRow>;
}

/** Defines Cairn's models on a Sequelize instance (the tables come from the migrations). */
export function defineModels(sequelize: Sequelize): Models {
  const str = (n: number) => ({ type: DataTypes.STRING(n), allowNull: false });
  const User = sequelize.define<UserRow>(
    'User',
    {
      id: { type: DataTypes.STRING(36), primaryKey: true },
      email: str(254),
      name: str(80),
      passwordHash: str(100),
      role: str(20),
      disabled: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      tokenVersion: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      ...timestamps,
    },
    { tableName: 'users' },
  );
  const Setting = sequelize.define<SettingRow>(
    'Setting',
    { key: { type: DataTypes.STRING(60), primaryKey: true }, value: { type: DataTypes.TEXT, allowNull: false }, ...timestamps },
    { tableName: 'settings' },
  );
  const Workshop = sequelize.define<WorkshopRow>(
    'Workshop',
    {
      id: { type: DataTypes.STRING(36), primaryKey: true },
      ownerId: str(36),
      title: str(120),
      objective: { type: DataTypes.TEXT, allowNull: false },
      persona: { type: DataTypes.TEXT, allowNull: false },
      date: str(10),
      window: { type: DataTypes.JSON, allowNull: false },
      venueNotes: { type: DataTypes.TEXT, allowNull: false },
      headcount: { type: DataTypes.INTEGER, allowNull: false },
      teamCount: { type: DataTypes.INTEGER, allowNull: false },
      roomCapacity: { type: DataTypes.INTEGER, allowNull: true },
      consentText: { type: DataTypes.TEXT, allowNull: false },
      rules: { type: DataTypes.JSON, allowNull: false },
      packed: { type: DataTypes.JSON, allowNull: false },
      retentionDays: { type: DataTypes.INTEGER, allowNull: true, defaultValue: null },
      personalDataDeletedAt: { type: DataTypes.DATE, allowNull: true, defaultValue: null },
      ...timestamps,
    },
    { tableName: 'workshops' },
  );
  const AgendaItem = sequelize.define<AgendaItemRow>(
    'AgendaItem',
    {
      id: { type: DataTypes.STRING(64), primaryKey: true },
      workshopId: str(36),
      position: { type: DataTypes.INTEGER, allowNull: false },
      type: str(30),
      phase: str(20),
      title: str(120),
      timeboxMin: { type: DataTypes.INTEGER, allowNull: false },
      minTimeboxMin: { type: DataTypes.INTEGER, allowNull: false },
      prompt: { type: DataTypes.TEXT, allowNull: false },
      settings: { type: DataTypes.JSON, allowNull: false },
      pinnedAt: { type: DataTypes.STRING(5), allowNull: true, defaultValue: null },
      ...timestamps,
    },
    { tableName: 'agenda_items' },
  );
  const Membership = sequelize.define<MembershipRow>(
    'Membership',
    { id: { type: DataTypes.STRING(36), primaryKey: true }, workshopId: str(36), userId: str(36), role: str(20), ...timestamps },
    { tableName: 'memberships' },
  );
  const Invitation = sequelize.define<InvitationRow>(
    'Invitation',
    {
      id: { type: DataTypes.STRING(36), primaryKey: true },
      workshopId: str(36),
      email: str(254),
      role: str(20),
      tokenHash: str(64),
      invitedById: str(36),
      acceptedAt: { type: DataTypes.DATE, allowNull: true },
      expiresAt: { type: DataTypes.DATE, allowNull: false },
      ...timestamps,
    },
    { tableName: 'invitations' },
  );
  const PasswordReset = sequelize.define<PasswordResetRow>(
    'PasswordReset',
    {
      id: { type: DataTypes.STRING(36), primaryKey: true },
      userId: str(36),
      tokenHash: str(64),
      usedAt: { type: DataTypes.DATE, allowNull: true },
      expiresAt: { type: DataTypes.DATE, allowNull: false },
      ...timestamps,
    },
    { tableName: 'password_resets' },
  );
  const LiveSession = sequelize.define<LiveSessionRow>(
    'LiveSession',
    {
      id: { type: DataTypes.STRING(36), primaryKey: true },
      workshopId: str(36),
      joinCode: str(16),
      status: str(10),
      kind: { type: DataTypes.STRING(10), allowNull: false, defaultValue: 'day' },
      timeboxes: { type: DataTypes.JSON, allowNull: false, defaultValue: {} },
      timeboxesBefore: { type: DataTypes.JSON, allowNull: true, defaultValue: null },
      currentIndex: { type: DataTypes.INTEGER, allowNull: false },
      timer: { type: DataTypes.JSON, allowNull: false },
      locked: { type: DataTypes.BOOLEAN, allowNull: false },
      revealed: { type: DataTypes.BOOLEAN, allowNull: false },
      message: { type: DataTypes.JSON, allowNull: true },
      runs: { type: DataTypes.JSON, allowNull: false },
      version: { type: DataTypes.INTEGER, allowNull: false },
      startedAt: { type: DataTypes.DATE, allowNull: false },
      endedAt: { type: DataTypes.DATE, allowNull: true },
      projectorLocale: { type: DataTypes.STRING(5), allowNull: false, defaultValue: 'en' },
      ...timestamps,
    },
    { tableName: 'live_sessions' },
  );
  const Participant = sequelize.define<ParticipantRow>(
    'Participant',
    {
      id: { type: DataTypes.STRING(36), primaryKey: true },
      sessionId: str(36),
      deviceId: str(64),
      displayName: str(40),
      photoConsent: { type: DataTypes.BOOLEAN, allowNull: false },
      teamId: { type: DataTypes.STRING(64), allowNull: true },
      email: { type: DataTypes.STRING(254), allowNull: true },
      locale: { type: DataTypes.STRING(5), allowNull: false, defaultValue: 'en' },
      joinedAt: { type: DataTypes.DATE, allowNull: false },
      lastSeenAt: { type: DataTypes.DATE, allowNull: false },
    },
    { tableName: 'participants', timestamps: false },
  );
  const Submission = sequelize.define<SubmissionRow>(
    'Submission',
    {
      id: { type: DataTypes.STRING(36), primaryKey: true },
      sessionId: str(36),
      itemId: str(64),
      participantId: str(36),
      clientId: str(64),
      kind: str(20),
      part: { type: DataTypes.STRING(30), allowNull: true },
      text: { type: DataTypes.TEXT, allowNull: false },
      fields: { type: DataTypes.JSON, allowNull: true },
      teamId: { type: DataTypes.STRING(64), allowNull: true },
      hidden: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      themeId: { type: DataTypes.STRING(36), allowNull: true },
      mergedIntoId: { type: DataTypes.STRING(36), allowNull: true, defaultValue: null },
      createdAt: { type: DataTypes.DATE, allowNull: false },
    },
    // createdAt is set by the service, not by Sequelize, and submissions have no updatedAt.
    { tableName: 'submissions', timestamps: false },
  );
  const Team = sequelize.define<TeamRow>(
    'Team',
    {
      id: { type: DataTypes.STRING(36), primaryKey: true },
      sessionId: str(36),
      name: str(60),
      challenge: { type: DataTypes.TEXT, allowNull: true },
      position: { type: DataTypes.INTEGER, allowNull: false },
      retiredAt: { type: DataTypes.DATE, allowNull: true, defaultValue: null },
      ...timestamps,
    },
    { tableName: 'teams' },
  );
  const Theme = sequelize.define<ThemeRow>(
    'Theme',
    {
      id: { type: DataTypes.STRING(36), primaryKey: true },
      sessionId: str(36),
      itemId: str(64),
      name: str(80),
      position: { type: DataTypes.INTEGER, allowNull: false },
      ...timestamps,
    },
    { tableName: 'themes' },
  );
  const Promotion = sequelize.define<PromotionRow>(
    'Promotion',
    {
      id: { type: DataTypes.STRING(36), primaryKey: true },
      sessionId: str(36),
      itemId: str(64),
      sourceKind: str(10),
      sourceId: str(36),
      text: { type: DataTypes.TEXT, allowNull: false },
      position: { type: DataTypes.INTEGER, allowNull: false },
      createdAt: { type: DataTypes.DATE, allowNull: false },
    },
    { tableName: 'promotions', timestamps: false },
  );
  const Photo = sequelize.define<PhotoRow>(
    'Photo',
    {
      id: { type: DataTypes.STRING(36), primaryKey: true },
      sessionId: str(36),
      itemId: str(64),
      participantId: str(36),
      clientId: str(64),
      storageKey: str(64),
      width: { type: DataTypes.INTEGER, allowNull: false },
      height: { type: DataTypes.INTEGER, allowNull: false },
      bytes: { type: DataTypes.INTEGER, allowNull: false },
      showsPeople: { type: DataTypes.BOOLEAN, allowNull: false },
      peopleConsent: { type: DataTypes.BOOLEAN, allowNull: false },
      createdAt: { type: DataTypes.DATE, allowNull: false },
    },
    { tableName: 'photos', timestamps: false },
  );
  const ActivityState = sequelize.define<ActivityStateRow>(
    'ActivityState',
    {
      id: { type: DataTypes.STRING(36), primaryKey: true },
      sessionId: str(36),
      itemId: str(64),
      round: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      roster: { type: DataTypes.JSON, allowNull: true },
      frameOrders: { type: DataTypes.JSON, allowNull: false },
      ...timestamps,
    },
    { tableName: 'activity_states' },
  );
  const Vote = sequelize.define<VoteRow>(
    'Vote',
    {
      id: { type: DataTypes.STRING(36), primaryKey: true },
      sessionId: str(36),
      itemId: str(64),
      kind: str(20),
      status: str(10),
      options: { type: DataTypes.JSON, allowNull: false },
      rules: { type: DataTypes.JSON, allowNull: false },
      chosen: { type: DataTypes.JSON, allowNull: true },
      proposal: { type: DataTypes.JSON, allowNull: true },
      ...timestamps,
    },
    { tableName: 'votes' },
  );
  const VoteDot = sequelize.define<VoteDotRow>(
    'VoteDot',
    {
      id: { type: DataTypes.STRING(36), primaryKey: true },
      voteId: str(36),
      participantId: str(36),
      optionId: str(64),
      criterionId: str(40),
      count: { type: DataTypes.INTEGER, allowNull: false },
    },
    { tableName: 'vote_dots', timestamps: false },
  );
  const VoteRanking = sequelize.define<VoteRankingRow>(
    'VoteRanking',
    {
      id: { type: DataTypes.STRING(36), primaryKey: true },
      voteId: str(36),
      participantId: str(36),
      ranking: { type: DataTypes.JSON, allowNull: false },
      updatedAt: { type: DataTypes.DATE, allowNull: false },
    },
    // updatedAt is set by the service with each new order; rankings have no createdAt.
    { tableName: 'vote_rankings', timestamps: false },
  );
  const VoteReceipt = sequelize.define<VoteReceiptRow>(
    'VoteReceipt',
    {
      id: { type: DataTypes.STRING(36), primaryKey: true },
      participantId: str(36),
      clientId: str(64),
      voteId: str(36),
      createdAt: { type: DataTypes.DATE, allowNull: false },
    },
    { tableName: 'vote_receipts', timestamps: false },
  );
  return {
    User,
    Setting,
    Workshop,
    AgendaItem,
    Membership,
    Invitation,
    PasswordReset,
    LiveSession,
    Participant,
    Submission,
    Team,
    Theme,
    Promotion,
    Photo,
    ActivityState,
    Vote,
    VoteDot,
    VoteRanking,
    VoteReceipt,
  };
}
