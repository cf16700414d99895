import { stringify } from 'csv-stringify/sync';
import type { ExportFile, NoteResult, WorkshopResults } from '../../../shared/schemas/results';
import { partLabel } from '../../../shared/schemas/activities';
import type { Locale } from '../../../shared/locales';
import type { Wording } from '../../../shared/wording';
import { RESULTS_FILE_LOCALE, facilitatorWording } from '../../common/catalogs';

// Every header and fixed cell word comes from the facilitator catalogs' `reportFile.csv`, in the exports' language.
/** A CSV word: `reportFile.csv.<key>` in the wording's language. */
const say = (l: Wording, key: string, params: Record<string, string | number> = {}): string => l.t(`reportFile.csv.${key}`, params);
/** A header: each column's word from the catalog. */
const headerOf = (l: Wording, keys: string[]): string[] => keys.map((k) => say(l, k));

/** A value of a CSV cell before it is written. */
type Cell = string | number | boolean | null;

/** One CSV table: its header and its records, each as wide as the header. */
export interface CsvTable {
  header: string[];
  rows: Cell[][];
}

/** Options of a CSV export. */
export interface CsvOptions {
  /** For spreadsheet users: start with a UTF-8 byte-order mark (so accented and non-Latin text opens right). */
  bom: boolean;
  /** The language of the header and the fixed words (yes, no, "Partner: …"); {@link RESULTS_FILE_LOCALE} unless given. */
  locale?: Locale;
  /**
   * Keep text that a spreadsheet would run as a formula exactly as written; by default an apostrophe
   * goes before it, since participants' notes end up in spreadsheets whatever the file was meant for.
   */
  raw?: boolean;
}

/** Text cells that spreadsheets would read as a formula (OWASP, "CSV Injection"): = + - @, tab and carriage return first. */
const FORMULA_START = /^[=+\-@\t\r]/;

/** A cell as text: numbers as written, yes/no for booleans (in the catalog's words), empty for nothing; formulas neutralised unless `raw`. */
function cellText(value: Cell, raw: boolean, l: Wording): string {
  if (value === null) return '';
  if (typeof value === 'boolean') return say(l, value ? 'yes' : 'no');
  if (typeof value === 'number') return String(value);
  return !raw && FORMULA_START.test(value) ? `'${value}` : value;
}

/**
 * Writes a table as RFC 4180 CSV: CRLF after every record, fields with a comma, a quote or a line
 * break (CR or LF) quoted, quotes doubled, the header as wide as the records.
 * @example toCsv({ header: ['a'], rows: [['x,y']] }, { bom: false }) // 'a\r\n"x,y"\r\n'
 */
export function toCsv(table: CsvTable, options: CsvOptions): string {
  for (const row of table.rows) {
    if (row.length !== table.header.length) throw new Error(`A CSV record has ${row.length} fields; the header has ${table.header.length}`);
  }
  const l = facilitatorWording(options.locale ?? RESULTS_FILE_LOCALE);
  return stringify([table.header, ...table.rows.map((r) => r.map((c) => cellText(c, options.raw ?? false, l)))], {
    record_delimiter: '\r\n',
    // csv-stringify quotes a field holding the record delimiter (CRLF) only; RFC 4180 wants any line break quoted.
    quoted_match: /[\r\n]/,
    bom: options.bom,
  });
}

/** A time as ISO 8601 in UTC, the form every spreadsheet reads. */
function iso(ms: number | null): string | null {
  return ms === null ? null : new Date(ms).toISOString();
}

/** Names of the people, teams and notes a note's fields point at, so the export never shows an internal id. */
type Names = { people: Map<string, string>; teams: Map<string, string>; notes: Map<string, NoteResult> };

/**
 * A note's structured fields in words: the partner and the team tested by name, the round counted from 1,
 * the sketch a comment is about by its caption and author, a guided sentence's fields as "name: value";
 * the id of a stored photo says nothing to a reader and is left out.
 */
function details(n: NoteResult, names: Names, l: Wording): string {
  if (!n.fields) return '';
  const out: string[] = [];
  for (const [key, value] of Object.entries(n.fields)) {
    if (key === 'partnerId') out.push(say(l, 'partner', { name: names.people.get(value) ?? say(l, 'partnerGone') }));
    else if (key === 'hostTeamId') out.push(say(l, 'teamTested', { team: names.teams.get(value) ?? say(l, 'teamGone') }));
    else if (key === 'round' && /^\d+$/.test(value)) out.push(say(l, 'round', { n: Number(value) + 1 }));
    else if (key === 'sketchId') {
      const sketch = names.notes.get(value);
      out.push(sketch ? say(l, 'aboutSketch', { caption: sketch.text || say(l, 'noCaption'), author: sketch.author }) : say(l, 'aboutASketch'));
    } else if (key === 'photoId') continue;
    else out.push(`${key}: ${value}`);
  }
  return out.join('; ');
}

/** Every note of the workshop (notes, guided sentences, feedback, frames, reflections), in agenda order, oldest first. */
export function notesTable(r: WorkshopResults, locale: Locale = RESULTS_FILE_LOCALE): CsvTable {
  const l = facilitatorWording(locale);
  const agenda = new Map(r.agenda.map((a) => [a.itemId, a]));
  const order = (n: NoteResult) => agenda.get(n.itemId)?.position ?? Number.MAX_SAFE_INTEGER;
  const notes = [...r.notes].sort((a, b) => order(a) - order(b) || a.createdAt - b.createdAt || a.id.localeCompare(b.id));
  const names: Names = {
    people: new Map(r.participants.map((p) => [p.id, p.name])),
    teams: new Map(r.teams.map((t) => [t.id, t.name])),
    notes: new Map(r.notes.map((n) => [n.id, n])),
  };
  return {
    header: headerOf(l, ['session', 'activityNumber', 'activity', 'activityType', 'author', 'team', 'theme', 'kind', 'part', 'note', 'details', 'writtenAt']),
    rows: notes.map((n) => {
      const a = agenda.get(n.itemId);
      return [n.session, a?.position ?? null, a?.title ?? '', a?.type ?? '', n.author, n.teamName, n.themeName, n.kind, n.part === null ? null : partLabel(n.part), n.text, details(n, names, l), iso(n.createdAt)];
    }),
  };
}

/** Teams with their challenges and members. */
export function teamsTable(r: WorkshopResults, locale: Locale = RESULTS_FILE_LOCALE): CsvTable {
  return {
    header: headerOf(facilitatorWording(locale), ['session', 'team', 'challenge', 'size', 'members']),
    rows: r.teams.map((t) => [t.session, t.name, t.challenge, t.members.length, t.members.map((m) => m.name).join('; ')]),
  };
}

/** Everyone who joined, numbered in order of joining; whether they left an address, never the address. */
export function participantsTable(r: WorkshopResults, locale: Locale = RESULTS_FILE_LOCALE): CsvTable {
  return {
    header: headerOf(facilitatorWording(locale), ['session', 'number', 'name', 'team', 'photoConsent', 'leftAddress', 'joinedAt', 'notes']),
    rows: r.participants.map((p) => [p.session, p.number, p.name, p.teamName, p.photoConsent, p.leftAddress, iso(p.joinedAt), p.notes]),
  };
}

/** Every vote's result: each option's score, rank, ties and selection, overall and per criterion. */
export function talliesTable(r: WorkshopResults, locale: Locale = RESULTS_FILE_LOCALE): CsvTable {
  const rows: Cell[][] = [];
  for (const a of r.activities) {
    for (const s of a.sections) {
      if (s.kind !== 'votes') continue;
      const blocks = [{ label: s.rankedBy, rows: s.overall }, ...s.tables];
      for (const block of blocks) {
        for (const v of block.rows) rows.push([s.session ?? '', a.position, a.title, s.method, block.label, v.label, v.score, v.rank, v.tied, v.nearTie, v.selected, v.quadrant ?? '']);
      }
    }
  }
  const header = headerOf(facilitatorWording(locale), ['session', 'activityNumber', 'activity', 'method', 'rankedBy', 'option', 'score', 'rank', 'tied', 'nearTie', 'selected', 'matrixQuadrant']);
  return { header, rows };
}

/** Every dot placed and every ballot position, voter by voter. */
export function votesTable(r: WorkshopResults, locale: Locale = RESULTS_FILE_LOCALE): CsvTable {
  const position = new Map(r.agenda.map((a) => [a.itemId, a.position]));
  return {
    header: headerOf(facilitatorWording(locale), ['session', 'activityNumber', 'activity', 'voter', 'option', 'criterion', 'value']),
    rows: r.votes.map((v) => [v.session, position.get(v.itemId) ?? null, v.activity, v.voter, v.option, v.criterion, v.value]),
  };
}

/** The table behind each CSV export file. */
export const CSV_TABLES: Record<Exclude<ExportFile, 'results.json'>, (r: WorkshopResults, locale?: Locale) => CsvTable> = {
  'notes.csv': notesTable,
  'teams.csv': teamsTable,
  'participants.csv': participantsTable,
  'tallies.csv': talliesTable,
  'votes.csv': votesTable,
};

/** A file name for an export: Cairn, the workshop's title as a slug, the date and the table. */
export function exportFileName(r: WorkshopResults, file: string): string {
  const slug =
    r.workshop.title
      .normalize('NFKD')
      .replace(/[^\w\s-]/g, '')
      .trim()
      .toLowerCase()
      .replace(/[\s_-]+/g, '-')
      .slice(0, 60) || 'workshop';
  return `cairn-${slug}-${r.workshop.date}-${file}`;
}

/**
 * One export file of a workshop's results: a CSV table, or the complete results as JSON.
 * @example exportFile(results, 'notes.csv', { bom: true }).body
 */
export function exportFile(r: WorkshopResults, file: ExportFile, options: CsvOptions): { body: string; contentType: string; fileName: string } {
  const fileName = exportFileName(r, file);
  if (file === 'results.json') return { body: JSON.stringify(r, null, 2), contentType: 'application/json; charset=utf-8', fileName };
  return { body: toCsv(CSV_TABLES[file](r, options.locale), options), contentType: 'text/csv; charset=utf-8; header=present', fileName };
}
