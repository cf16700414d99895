import crypto from 'node:crypto';
import { QueryTypes, type Transaction } from 'sequelize';
import type { AppContext } from '../../context';
import type { VoteRow } from '../../db/models';
import { sqliteDate, type RawStatements } from '../../db';
import type { Dot } from '../../../shared/tally';

/**
 * What the dot path keeps of a vote between commits: each voter's dots as the checks see them (those of the
 * group commit under way included), which client ids of the session were applied, and each voter's dots as
 * they are stored (`stored`: moved only once a group commit has committed, so a tally taken from it is what
 * the file holds).
 */
export interface DotLedger {
  voteId: string;
  ballots: Map<string, Dot[]>;
  receipts: Set<string>;
  stored: Map<string, Dot[]>;
}

/** A group commit's dot writes: the final count of every dot it changed, the receipts it adds, and each changed ballot. */
interface DotWrites {
  dots: Map<string, { voteId: string; participantId: string; optionId: string; criterionId: string; count: number }>;
  receipts: [id: string, participantId: string, clientId: string, voteId: string][];
  ballots: Map<string, { ledger: DotLedger; participantId: string; dots: Dot[] }>;
}

/**
 * What the dot path reads of a vote, copied out of the model instance once: each read of a model's
 * attribute goes through its getter, a dozen times a dot.
 */
export type LedgerVote = Pick<VoteRow, 'id' | 'itemId' | 'kind' | 'status' | 'options' | 'rules'>;

/** The key of a receipt in a ledger: one participant's one client id. */
export function receiptKey(participantId: string, clientId: string): string {
  return `${participantId}\n${clientId}`;
}

/**
 * A group commit's writes, one statement a table whatever the number of rows: the rows go in as one
 * JSON array (`json_each`), so each statement is compiled once and binds one value, where a multi-row
 * VALUES list was compiled afresh for every batch and bound six values a row.
 */
const UPSERT_DOTS = `INSERT INTO vote_dots (id, voteId, participantId, optionId, criterionId, count)
  SELECT value ->> 0, value ->> 1, value ->> 2, value ->> 3, value ->> 4, value ->> 5 FROM json_each(?) WHERE true
  ON CONFLICT (voteId, participantId, optionId, criterionId) DO UPDATE SET count = excluded.count`;
const DELETE_DOTS = `DELETE FROM vote_dots WHERE (voteId, participantId, optionId, criterionId) IN
  (SELECT value ->> 0, value ->> 1, value ->> 2, value ->> 3 FROM json_each(?))`;
const INSERT_RECEIPTS = `INSERT INTO vote_receipts (id, participantId, clientId, voteId, createdAt)
  SELECT value ->> 0, value ->> 1, value ->> 2, value ->> 3, value ->> 4 FROM json_each(?)`;

/** Stores a group commit's dots: counts by upsert on the unique (vote, voter, option, criterion) index, zeros deleted, receipts appended. */
async function storeDots(sql: RawStatements, writes: DotWrites): Promise<void> {
  const kept: (string | number)[][] = [];
  const zeros: string[][] = [];
  for (const r of writes.dots.values()) {
    if (r.count > 0) kept.push([crypto.randomUUID(), r.voteId, r.participantId, r.optionId, r.criterionId, r.count]);
    else zeros.push([r.voteId, r.participantId, r.optionId, r.criterionId]);
  }
  if (kept.length) await sql.run(UPSERT_DOTS, [JSON.stringify(kept)]);
  if (zeros.length) await sql.run(DELETE_DOTS, [JSON.stringify(zeros)]);
  // A receipt is dated when its group commit stores it, a few milliseconds after its dot was checked.
  const at = sqliteDate(new Date());
  if (writes.receipts.length) await sql.run(INSERT_RECEIPTS, [JSON.stringify(writes.receipts.map((r) => [...r, at]))]);
}

/**
 * The dot path's memory and its SQL. The dot path is the hottest in a room (every phone, several times,
 * within seconds), so it keeps what does not change under it: which session a participant is in, the
 * vote of the current item (forgotten on every change of a vote), each vote's ledger of committed dots
 * and the session's receipts; a dot's writes wait for the end of its group commit and are stored there
 * as a few multi-row statements.
 */
export class DotLedgers {
  private sessionOfParticipant = new Map<string, string>();
  private participantsRead = new Map<string, Promise<void>>();
  private voteOfItem = new Map<string, LedgerVote>();
  private ledgers = new Map<string, DotLedger>();
  private receiptsOfSession = new Map<string, Set<string>>();
  private dotWrites = new WeakMap<Transaction, DotWrites>();

  constructor(private ctx: AppContext) {}

  /**
   * Whether a participant is in a session (it never changes once joined). The first miss of a session
   * reads all its participants at once: in a burst, every phone's first dot would otherwise read its own.
   */
  async inSession(participantId: string, sessionId: string): Promise<boolean> {
    return this.knownInSession(participantId, sessionId) || this.readInSession(participantId, sessionId);
  }

  /** Whether a participant is known to be in a session, from memory alone (the dot path's usual answer, without a promise). */
  knownInSession(participantId: string, sessionId: string): boolean {
    return this.sessionOfParticipant.get(participantId) === sessionId;
  }

  private async readInSession(participantId: string, sessionId: string): Promise<boolean> {
    const known = this.sessionOfParticipant.get(participantId);
    if (known) return known === sessionId;
    let reading = this.participantsRead.get(sessionId);
    if (!reading) {
      reading = this.ctx.db.sequelize
        .query<{ id: string }>('SELECT id FROM participants WHERE sessionId = ?', { replacements: [sessionId], type: QueryTypes.SELECT })
        .then((rows) => {
          for (const r of rows) this.sessionOfParticipant.set(r.id, sessionId);
        });
      this.participantsRead.set(sessionId, reading);
      // A read that failed is tried again by the next dot.
      reading.catch(() => this.participantsRead.delete(sessionId));
    }
    await reading;
    const read = this.sessionOfParticipant.get(participantId);
    if (read) return read === sessionId;
    // Joined after the session's participants were read, or in another session.
    const p = await this.ctx.db.models.Participant.findByPk(participantId, { attributes: ['id', 'sessionId'] });
    if (p) this.sessionOfParticipant.set(participantId, p.sessionId);
    return p?.sessionId === sessionId;
  }

  /** The vote of an item, from memory while no command has changed any vote since it was read. */
  async vote(sessionId: string, itemId: string, transaction: Transaction): Promise<LedgerVote | null> {
    const k = `${sessionId}:${itemId}`;
    const known = this.voteOfItem.get(k);
    if (known) return known;
    const row = await this.ctx.db.models.Vote.findOne({ where: { sessionId, itemId }, transaction });
    if (!row) return null;
    const vote: LedgerVote = { id: row.id, itemId: row.itemId, kind: row.kind, status: row.status, options: row.options, rules: row.rules };
    this.voteOfItem.set(k, vote);
    return vote;
  }

  /** A vote's ledger: from memory, else read inside the writer's transaction (every voter's dots on it and the receipts of its session). */
  async ledger(voteId: string, sessionId: string, transaction: Transaction): Promise<DotLedger> {
    const known = this.ledgers.get(voteId);
    if (known) return known;
    const sql = this.ctx.db.raw(transaction);
    const dots = await sql.all<{ participantId: string; optionId: string; criterionId: string; count: number }>(
      'SELECT participantId, optionId, criterionId, count FROM vote_dots WHERE voteId = ?',
      [voteId],
    );
    let receipts = this.receiptsOfSession.get(sessionId);
    if (!receipts) {
      const rows = await sql.all<{ participantId: string; clientId: string }>(
        'SELECT r.participantId, r.clientId FROM vote_receipts r JOIN votes v ON v.id = r.voteId WHERE v.sessionId = ?',
        [sessionId],
      );
      receipts = new Set(rows.map((r) => receiptKey(r.participantId, r.clientId)));
      this.receiptsOfSession.set(sessionId, receipts);
    }
    const ballots = new Map<string, Dot[]>();
    for (const d of dots) {
      const list = ballots.get(d.participantId) ?? [];
      list.push({ voterId: d.participantId, optionId: d.optionId, criterionId: d.criterionId, count: Number(d.count) });
      ballots.set(d.participantId, list);
    }
    // Read inside the writer's transaction before any dot of it: what is stored now.
    const ledger = { voteId, ballots, receipts, stored: new Map(ballots) };
    this.ledgers.set(voteId, ledger);
    return ledger;
  }

  /**
   * Every stored dot of a vote, from memory, when its ledger is kept (null otherwise: read the file). The
   * ledger was read inside the writer's transaction and moves with every commit after it, so it holds what
   * the file holds; only this process's writes are seen, so a caller sharing the file with other processes
   * reads the file instead.
   */
  storedDots(voteId: string): Dot[] | null {
    const ledger = this.ledgers.get(voteId);
    if (!ledger) return null;
    const dots: Dot[] = [];
    for (const list of ledger.stored.values()) for (const d of list) dots.push(d);
    return dots;
  }

  /**
   * Records an applied dot: the ledger moves now (so the next dot of the same batch sees it), and its
   * writes, the dot's new count and its receipt, wait for the commit of `transaction`.
   */
  record(transaction: Transaction, ledger: DotLedger, vote: LedgerVote, participantId: string, clientId: string, dots: Dot[], dot: { optionId: string; criterionId: string; count: number }): void {
    ledger.ballots.set(participantId, dots);
    ledger.receipts.add(receiptKey(participantId, clientId));
    const writes = this.writesOf(transaction);
    writes.dots.set([vote.id, participantId, dot.optionId, dot.criterionId].join('\n'), { voteId: vote.id, participantId, ...dot });
    writes.receipts.push([crypto.randomUUID(), participantId, clientId, vote.id]);
    writes.ballots.set(`${vote.id}\n${participantId}`, { ledger, participantId, dots });
  }

  /** Adds a receipt stored by another path (a ranking) to its session's receipts, if they are kept. */
  addReceipt(sessionId: string, participantId: string, clientId: string): void {
    this.receiptsOfSession.get(sessionId)?.add(receiptKey(participantId, clientId));
  }

  /** Forgets the votes and ledgers kept in memory: called inside every transaction that changes a vote, and after a rolled-back batch. */
  forget(): void {
    this.voteOfItem.clear();
    this.ledgers.clear();
    this.receiptsOfSession.clear();
  }

  /** The dot writes a transaction collects; the first dot of a transaction has them stored just before its commit. */
  private writesOf(transaction: Transaction): DotWrites {
    let writes = this.dotWrites.get(transaction);
    if (!writes) {
      const fresh: DotWrites = { dots: new Map(), receipts: [], ballots: new Map() };
      this.dotWrites.set(transaction, fresh);
      this.ctx.db.beforeCommit(transaction, () => storeDots(this.ctx.db.raw(transaction), fresh));
      // Committed: the stored ballots move (a rolled-back batch never gets here, and its ledgers are forgotten).
      transaction.afterCommit(() => {
        for (const b of fresh.ballots.values()) {
          if (b.dots.length > 0) b.ledger.stored.set(b.participantId, b.dots);
          else b.ledger.stored.delete(b.participantId);
        }
      });
      writes = fresh;
    }
    return writes;
  }
}
