/**
 * Theme suggestions for sticky notes: groups of notes that share words, for the facilitator to
 * accept or change.
 */
import { stemmer } from 'stemmer';

/** A note as theme suggestions read it. */
export interface ThemeNote {
  id: string;
  text: string;
}

/** A suggested theme: a label and the ids of its notes, in the order the notes were given. */
export interface ThemeSuggestion {
  label: string;
  noteIds: string[];
}

/** Options of {@link suggestThemes}. */
export interface ThemeOptions {
  /**
   * The least average similarity (weighted Jaccard, 0–1) at which two groups of notes are joined;
   * higher asks for closer groups. Default {@link DEFAULT_MIN_SIMILARITY}.
   */
  minSimilarity?: number;
}

/** The default of {@link ThemeOptions.minSimilarity}, tuned on short sticky notes of 3–8 words. */
export const DEFAULT_MIN_SIMILARITY = 0.05;

// A small English stop-word list; contractions appear without their apostrophe (see tokenize).
const STOP_WORDS = new Set(
  `a about above after again against all also am an and any are as at be because been before
  being below between both but by can cant could couldnt did didnt do does doesnt doing dont down
  during each even few for from further get got had hadnt has hasnt have havent having he her here
  hers herself him himself his how i id if im in into is isnt it its itself ive just let lets me
  more most much my myself no nor not now of off on once one only or other our ours out over own
  really same she should shouldnt so some still such than that thats the their theirs them then
  there theres these they this those through to too under until up us very was wasnt we were
  werent what when where which while who whom why will with wont would wouldnt you youre your
  yours`.split(/\s+/),
);

/**
 * Function words of scripts written without spaces between words (particles and inflection pieces in
 * Japanese, common function words in Chinese and Thai): from memory, kept short on purpose, as the
 * inverse document frequency below already weighs down words most notes use.
 */
const SPACELESS_STOP_WORDS = new Set(
  `です ます から まで ない した して ある いる する こと もの これ それ
  的 了 是 在 我 有 和 就 不 都 也 很 到 说 要 你 会 着 没有 太 这 那 吗 呢 吧
  ที่ และ ไม่ เป็น มี ใน ของ ได้ ไป ให้ กับ ว่า จะ แล้ว ก็ ไม่มี เกิน มาก`.split(/\s+/),
);

/** A single kana: a particle or a piece of an inflection once Japanese is cut into words, never a theme. */
const LONE_KANA = /^[\p{Script=Hiragana}\p{Script=Katakana}]$/u;

/**
 * Word boundaries in scripts written without spaces between words, from the runtime's Unicode word
 * segmentation (ICU's dictionaries find the words of Japanese, Chinese and Thai); one instance, as
 * creating one is slow. Only runs of those scripts go through it (it is far slower than a regular
 * expression); older browsers without `Intl.Segmenter` keep such a run whole.
 */
const segmenter = typeof Intl !== 'undefined' && 'Segmenter' in Intl ? new Intl.Segmenter('und', { granularity: 'word' }) : null;
const SPACELESS = /[\p{Script=Han}\p{Script=Hiragana}\p{Script=Katakana}\p{Script=Thai}\p{Script=Lao}\p{Script=Khmer}\p{Script=Myanmar}]/u;

function words(text: string): string[] {
  const runs = text.match(/\p{L}[\p{L}\p{M}]*/gu) ?? [];
  if (!segmenter) return runs;
  const out: string[] = [];
  for (const run of runs) {
    if (!SPACELESS.test(run)) {
      out.push(run);
      continue;
    }
    for (const s of segmenter.segment(run)) if (s.isWordLike) out.push(s.segment);
  }
  return out;
}

/**
 * The content words of a text: runs of letters of any script (with their combining marks), and in
 * scripts written without spaces (Japanese, Chinese, Thai …) the words `Intl.Segmenter` finds inside
 * a run; lower case, apostrophes inside words dropped ("didn't" → "didnt"), stop words and lone kana removed.
 * @example tokenize("I didn't find the dock") // ['find', 'dock']
 */
export function tokenize(text: string): string[] {
  const normal = text.normalize('NFC').toLowerCase().replace(/(\p{L})['’](?=\p{L})/gu, '$1');
  return words(normal).filter((word) => !STOP_WORDS.has(word) && !SPACELESS_STOP_WORDS.has(word) && !LONE_KANA.test(word));
}

/** The Porter stem of an English word; words with other letters are kept whole (the stemmer knows English only). */
function stem(word: string): string {
  return /^[a-z]+$/.test(word) ? stemmer(word) : word;
}

/**
 * Suggested themes: groups of at least two notes that share words, largest first (then by their
 * first note), and each labelled with its most frequent shared stem, shown as that stem's most
 * common word in the group. Notes sharing nothing with the others stay out of every group.
 *
 * How: each note becomes its set of stems (tokenize, then the Porter stemmer). Two notes' similarity
 * is the Jaccard index of their stem sets with each stem weighted by its smoothed inverse document
 * frequency, ln(1 + notes ÷ notes with the stem), so a word most notes use ("bike" at a bike co-op)
 * joins notes less than a rarer one ("saddle"). Groups form by average-link agglomerative
 * clustering: repeatedly join the two groups of the highest average pairwise similarity, while it
 * is at least `minSimilarity`. Unlike single link, average link does not chain unrelated notes
 * together through one incidental shared word. Ties go to the earlier notes, so the result is
 * deterministic.
 *
 * Speed: similarities come from an inverted index (only notes that share a stem are compared); each
 * group keeps its best partner, so a join rescans only the rows it touches; the group-to-group sums
 * are one dense table, 8 bytes per pair of candidate notes (8 MB for 1,000).
 * `npm run bench:themes` prints the time for 1,000 notes.
 * @example suggestThemes([{ id: 'a', text: 'Helmet too big' }, { id: 'b', text: 'No helmet left' }])
 * // [{ label: 'helmet', noteIds: ['a', 'b'] }]
 */
export function suggestThemes(notes: readonly ThemeNote[], options: ThemeOptions = {}): ThemeSuggestion[] {
  const minSimilarity = options.minSimilarity ?? DEFAULT_MIN_SIMILARITY;
  if (!(minSimilarity > 0 && minSimilarity <= 1)) {
    throw new RangeError(`minSimilarity must be above 0 and at most 1, got ${minSimilarity}`);
  }

  const noteWords = notes.map((note) => tokenize(note.text));
  const stemOf = new Map<string, string>();
  const cachedStem = (word: string): string => {
    let s = stemOf.get(word);
    if (s === undefined) stemOf.set(word, (s = stem(word)));
    return s;
  };
  const stems = noteWords.map((list) => new Set(list.map(cachedStem)));
  const notesWith = new Map<string, number>();
  for (const set of stems) for (const s of set) notesWith.set(s, (notesWith.get(s) ?? 0) + 1);
  const weight = (s: string): number => Math.log(1 + notes.length / notesWith.get(s)!);

  // Only notes with a stem another note has can join a group; each keeps its shared stems as numbers.
  const stemId = new Map<string, number>();
  const stemWeight: number[] = [];
  const candidates: number[] = [];
  const candidateStems: number[][] = [];
  const total: number[] = [];
  stems.forEach((set, index) => {
    if (![...set].some((s) => notesWith.get(s)! > 1)) return;
    let sum = 0;
    const ids: number[] = [];
    for (const s of set) {
      sum += weight(s);
      if (notesWith.get(s)! < 2) continue;
      let id = stemId.get(s);
      if (id === undefined) {
        id = stemWeight.length;
        stemId.set(s, id);
        stemWeight.push(weight(s));
      }
      ids.push(id);
    }
    candidates.push(index);
    candidateStems.push(ids);
    total.push(sum);
  });
  const m = candidates.length;

  // sums[i * m + j]: the sum of the pairwise similarities between groups i and j (at first, notes).
  // Shared weight per pair from the inverted index, then Jaccard = shared ÷ (total a + total b − shared).
  const sums = new Float64Array(m * m);
  const postings: number[][] = stemWeight.map(() => []);
  candidateStems.forEach((ids, i) => ids.forEach((id) => postings[id].push(i)));
  for (const [id, list] of postings.entries()) {
    const w = stemWeight[id];
    for (let x = 0; x < list.length; x++) {
      for (let y = x + 1; y < list.length; y++) sums[list[x] * m + list[y]] += w;
    }
  }
  for (let i = 0; i < m; i++) {
    for (let j = i + 1; j < m; j++) {
      const shared = sums[i * m + j];
      if (shared === 0) continue;
      const similarity = shared / (total[i] + total[j] - shared);
      sums[i * m + j] = similarity;
      sums[j * m + i] = similarity;
    }
  }

  // Average-link clustering. A group merged into another is left empty. Each group i keeps its best
  // partner among the later groups (highest average, then the earliest), so the next join is the best of
  // these: the highest average, then the earliest pair, as a scan of every pair would find it. A join
  // changes only the rows that mention the two groups.
  const groups = candidates.map((index) => [index]);
  // The groups still open, in order; loops walk these instead of every slot as groups merge away.
  const alive = candidates.map((_, i) => i);
  const bestAverage = new Float64Array(m).fill(-1);
  const bestPartner = new Int32Array(m).fill(-1);
  const refresh = (i: number): void => {
    let average = -1;
    let partner = -1;
    const size = groups[i].length;
    for (const j of alive) {
      if (j <= i) continue;
      const sum = sums[i * m + j];
      if (sum === 0) continue;
      const value = sum / (size * groups[j].length);
      if (value > average) {
        average = value;
        partner = j;
      }
    }
    bestAverage[i] = average;
    bestPartner[i] = partner;
  };
  for (let i = 0; i < m; i++) refresh(i);
  for (;;) {
    let into = -1;
    for (const i of alive) if (bestPartner[i] >= 0 && (into < 0 || bestAverage[i] > bestAverage[into])) into = i;
    if (into < 0 || bestAverage[into] < minSimilarity) break;
    const from = bestPartner[into];
    // In place: a join allocates nothing, so a wall of notes makes little garbage to collect.
    groups[into].push(...groups[from]);
    groups[into].sort((x, y) => x - y);
    groups[from] = [];
    alive.splice(alive.indexOf(from), 1);
    for (const k of alive) {
      if (k === into) continue;
      const sum = sums[into * m + k] + sums[from * m + k];
      sums[into * m + k] = sum;
      sums[k * m + into] = sum;
    }
    refresh(into);
    for (const k of alive) {
      if (k >= from) break;
      if (k === into) continue;
      if (bestPartner[k] === into || bestPartner[k] === from) {
        refresh(k);
      } else if (k < into) {
        const sum = sums[k * m + into];
        if (sum === 0) continue;
        const value = sum / (groups[k].length * groups[into].length);
        if (value > bestAverage[k] || (value === bestAverage[k] && into < bestPartner[k])) {
          bestAverage[k] = value;
          bestPartner[k] = into;
        }
      }
    }
  }

  return groups
    .filter((group) => group.length >= 2)
    .sort((a, b) => b.length - a.length || a[0] - b[0])
    .map((group) => ({ label: labelOf(group, noteWords, stems, notesWith, cachedStem), noteIds: group.map((i) => notes[i].id) }));
}

/**
 * A group's label: the stem in most of its notes (on a tie, the one fewer notes overall have, as it
 * says more about this group; then alphabetical), shown as its most used word in the group.
 */
function labelOf(
  group: number[],
  words: string[][],
  stems: Set<string>[],
  notesWith: Map<string, number>,
  stem: (word: string) => string,
): string {
  const inGroup = new Map<string, number>();
  for (const i of group) for (const s of stems[i]) inGroup.set(s, (inGroup.get(s) ?? 0) + 1);
  const [top] = [...inGroup.entries()].sort(
    ([s1, n1], [s2, n2]) => n2 - n1 || notesWith.get(s1)! - notesWith.get(s2)! || (s1 < s2 ? -1 : s1 > s2 ? 1 : 0),
  )[0];

  // The most used word; on a tie the shortest ("dock" over "docks" and "docking"), then the first used.
  const uses = new Map<string, number>();
  for (const i of group) for (const word of words[i]) if (stem(word) === top) uses.set(word, (uses.get(word) ?? 0) + 1);
  let label = top;
  let most = 0;
  for (const [word, count] of uses) {
    if (count > most || (count === most && word.length < label.length)) [label, most] = [word, count];
  }
  return label;
}
