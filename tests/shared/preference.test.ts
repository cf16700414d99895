import { describe, expect, it } from 'vitest';
import { Borda as VotesBorda, Schulze as VotesSchulze, utils as votesUtils, type Ballot as VotesBallot } from 'votes';
import { type Ballot, borda, pairwiseMatrix, schulze, sharedFirstPlace } from '../../shared/preference';
import { selectTopN } from '../../shared/tally';
import { mulberry32 } from './random';

// Wikipedia, "Condorcet method" / "Borda count": the Tennessee capital example, weights as voters.
const tennessee = ['Memphis', 'Nashville', 'Chattanooga', 'Knoxville'];
const tennesseeBallots: Ballot[] = [
  { ranking: ['Memphis', 'Nashville', 'Chattanooga', 'Knoxville'], weight: 42 },
  { ranking: ['Nashville', 'Chattanooga', 'Knoxville', 'Memphis'], weight: 26 },
  { ranking: ['Chattanooga', 'Knoxville', 'Nashville', 'Memphis'], weight: 15 },
  { ranking: ['Knoxville', 'Chattanooga', 'Nashville', 'Memphis'], weight: 17 },
];

// M. Schulze, Social Choice and Welfare 36 (2011), and Wikipedia, "Schulze method": the 45-voter example.
const abcde = ['A', 'B', 'C', 'D', 'E'];
const schulzeBallots: Ballot[] = (
  [
    [5, 'ACBED'],
    [5, 'ADECB'],
    [8, 'BEDAC'],
    [3, 'CABED'],
    [7, 'CAEBD'],
    [2, 'CBADE'],
    [7, 'DCEBA'],
    [8, 'EBADC'],
  ] as const
).map(([weight, order]) => ({ ranking: order.split(''), weight }));

/** Rebuilds a full table from its off-diagonal rows as published (row i lists columns j ≠ i). */
function fromOffDiagonal(rows: number[][]): number[][] {
  return rows.map((row, i) => {
    const full = [...row];
    full.splice(i, 0, 0);
    return full;
  });
}

describe('pairwiseMatrix', () => {
  it('counts voters preferring each option to each other (Tennessee, recomputed from the ballots)', () => {
    const d = pairwiseMatrix(tennessee, tennesseeBallots);
    // Memphis loses every duel 42 to 58; Nashville beats Chattanooga and Knoxville 68 to 32;
    // Chattanooga beats Knoxville 83 to 17.
    expect(d).toEqual([
      [0, 42, 42, 42],
      [58, 0, 68, 68],
      [58, 32, 0, 83],
      [58, 32, 17, 0],
    ]);
  });

  it('matches Schulze’s published table d[i][j] for the 45-voter example', () => {
    // Schulze (2011) / Wikipedia "Schulze method": d[A][B..E] = 20 26 30 22, and so on.
    expect(pairwiseMatrix(abcde, schulzeBallots)).toEqual(
      fromOffDiagonal([
        [20, 26, 30, 22],
        [25, 16, 33, 18],
        [19, 29, 17, 24],
        [15, 12, 28, 14],
        [23, 27, 21, 31],
      ]),
    );
  });

  it('ranks missing options below listed ones, tied with each other; ignores unknown ids and repeats', () => {
    const d = pairwiseMatrix(['a', 'b', 'c'], [{ ranking: ['b', 'x', 'b'], weight: 2 }]);
    expect(d).toEqual([
      [0, 0, 0],
      [2, 0, 2],
      [0, 0, 0],
    ]);
  });
});

describe('borda', () => {
  it('gives the Tennessee example’s counts (Wikipedia, "Borda count": 194, 173, 126, 107)', () => {
    expect(borda(tennessee, tennesseeBallots)).toEqual([
      { optionId: 'Nashville', points: 194, rank: 1 },
      { optionId: 'Chattanooga', points: 173, rank: 2 },
      { optionId: 'Memphis', points: 126, rank: 3 },
      { optionId: 'Knoxville', points: 107, rank: 4 },
    ]);
  });

  it('gives E 102, A 98, B 92, C 89, D 69 on Schulze’s 45 ballots (recomputed from the ballots)', () => {
    expect(borda(abcde, schulzeBallots).map((r) => [r.optionId, r.points, r.rank])).toEqual([
      ['E', 102, 1],
      ['A', 98, 2],
      ['B', 92, 3],
      ['C', 89, 4],
      ['D', 69, 5],
    ]);
  });

  it('shares the leftover points evenly among options a ballot leaves out', () => {
    // 4 options, 'b' listed first: b gets 3, the other three share 2 + 1 + 0.
    expect(borda(['a', 'b', 'c', 'd'], [{ ranking: ['b'] }])).toEqual([
      { optionId: 'b', points: 3, rank: 1 },
      { optionId: 'a', points: 1, rank: 2 },
      { optionId: 'c', points: 1, rank: 2 },
      { optionId: 'd', points: 1, rank: 2 },
    ]);
    // Listing all but one option counts as the full ranking.
    const abc = ['a', 'b', 'c'];
    expect(borda(abc, [{ ranking: ['c', 'a'] }])).toEqual(borda(abc, [{ ranking: ['c', 'a', 'b'] }]));
  });
});

describe('schulze', () => {
  it('orders Tennessee Nashville > Chattanooga > Knoxville > Memphis (Wikipedia, "Condorcet method")', () => {
    expect(schulze(tennessee, tennesseeBallots).ranking).toEqual([
      { optionId: 'Nashville', rank: 1, wins: 3 },
      { optionId: 'Chattanooga', rank: 2, wins: 2 },
      { optionId: 'Knoxville', rank: 3, wins: 1 },
      { optionId: 'Memphis', rank: 4, wins: 0 },
    ]);
  });

  it('reproduces Schulze’s strongest paths p[i][j] and the order E > A > C > B > D', () => {
    const result = schulze(abcde, schulzeBallots);
    // Schulze (2011) / Wikipedia "Schulze method": p[A][B..E] = 28 28 30 24, and so on.
    expect(result.strongest).toEqual(
      fromOffDiagonal([
        [28, 28, 30, 24],
        [25, 28, 33, 24],
        [25, 29, 29, 24],
        [25, 28, 28, 24],
        [25, 28, 28, 31],
      ]),
    );
    expect(result.pairwise).toEqual(pairwiseMatrix(abcde, schulzeBallots));
    expect(result.ranking.map((r) => r.optionId)).toEqual(['E', 'A', 'C', 'B', 'D']);
    expect(result.ranking.map((r) => r.rank)).toEqual([1, 2, 3, 4, 5]);
  });

  it('shares a rank when neither option beats the other', () => {
    const { ranking } = schulze(['a', 'b', 'c'], [{ ranking: ['a', 'b', 'c'] }, { ranking: ['b', 'a', 'c'] }]);
    expect(ranking).toEqual([
      { optionId: 'a', rank: 1, wins: 1 },
      { optionId: 'b', rank: 1, wins: 1 },
      { optionId: 'c', rank: 3, wins: 0 },
    ]);
  });


  // Two voters, b>a>c and a>c>b: a beats c 2:0; a–b and b–c are 1:1, so nobody beats b. The winner
  // set (Schulze 2011, §2: the options a with p[a][b] ≥ p[b][a] for every b) is {a, b}.
  it('ranks every unbeaten option first: b>a>c and a>c>b give a and b first together', () => {
    const { ranking } = schulze(['a', 'b', 'c'], [{ ranking: ['b', 'a', 'c'] }, { ranking: ['a', 'c', 'b'] }]);
    expect(ranking).toEqual([
      { optionId: 'a', rank: 1, wins: 1 },
      { optionId: 'b', rank: 1, wins: 0 },
      { optionId: 'c', rank: 2, wins: 0 },
    ]);
    expect(sharedFirstPlace(ranking)).toEqual(['a', 'b']);
    // Top 1 sees the tie at its cut-off instead of taking a alone.
    const top = selectTopN(ranking.map((r) => ({ ...r, dots: 0, tied: false, nearTie: false })), 1);
    expect(top.selected).toEqual([]);
    expect(top.tiedAtCutoff).toEqual(['a', 'b']);
    // Top 2 takes both, and not c, whose rank 2 is below two options.
    expect(selectTopN(ranking.map((r) => ({ ...r, dots: 0, tied: false, nearTie: false })), 2)).toMatchObject({
      selected: ['a', 'b'],
      tiedAtCutoff: [],
    });
  });

  it('finds the winner set b, c, d of five ballots b>d>a>c, c>d>a>b, a>c>b>d, d>c>a>b, b>d>a>c', () => {
    const ballots = ['bdac', 'cdab', 'acbd', 'dcab', 'bdac'].map((o) => ({ ranking: o.split('') }));
    const options = ['a', 'b', 'c', 'd'];
    const { ranking, strongest } = schulze(options, ballots);
    // Reference: the brute force below, written from the definition (Schulze 2011, §2).
    const reference = referenceStrongest(pairwiseMatrix(options, ballots));
    expect(strongest).toEqual(reference);
    expect(referenceWinners(options, reference)).toEqual(['b', 'c', 'd']);
    expect(ranking.filter((r) => r.rank === 1).map((r) => r.optionId).sort()).toEqual(['b', 'c', 'd']);
    expect(sharedFirstPlace(ranking).sort()).toEqual(['b', 'c', 'd']);
    const top = selectTopN(ranking.map((r) => ({ ...r, dots: 0, tied: false, nearTie: false })), 1);
    expect(top.selected).toEqual([]);
    expect([...top.tiedAtCutoff].sort()).toEqual(['b', 'c', 'd']);
  });

  it('says nobody shares first place when one option is first alone', () => {
    expect(sharedFirstPlace(schulze(tennessee, tennesseeBallots).ranking)).toEqual([]);
    expect(sharedFirstPlace([])).toEqual([]);
  });

  it('handles no options and no ballots', () => {
    expect(schulze([], [])).toEqual({ pairwise: [], strongest: [], ranking: [] });
    expect(schulze(['a', 'b'], []).ranking.map((r) => r.rank)).toEqual([1, 1]);
  });
});

/**
 * Strongest path strengths by brute force, straight from the definition (M. Schulze, Social Choice and
 * Welfare 36 (2011), §2.1–2.2, winning votes): a link x→y exists when d[x][y] > d[y][x] and has strength
 * d[x][y]; a path's strength is its weakest link; p[a][b] is the strongest of every simple path from a to b,
 * 0 when there is none. Deliberately slow: it walks every simple path instead of Floyd–Warshall.
 */
function referenceStrongest(d: number[][]): number[][] {
  const n = d.length;
  const p = d.map((row) => row.map(() => 0));
  const visit = (start: number, at: number, weakest: number, used: boolean[]) => {
    for (let next = 0; next < n; next++) {
      if (used[next] || !(d[at][next] > d[next][at])) continue;
      const strength = Math.min(weakest, d[at][next]);
      p[start][next] = Math.max(p[start][next], strength);
      used[next] = true;
      visit(start, next, strength, used);
      used[next] = false;
    }
  };
  for (let a = 0; a < n; a++) {
    const used = new Array<boolean>(n).fill(false);
    used[a] = true;
    visit(a, a, Infinity, used);
    p[a][a] = 0;
  }
  return p;
}

/** The Schulze winners by the definition (Schulze 2011, §2): the options a with p[a][b] ≥ p[b][a] for every b. */
function referenceWinners(options: string[], p: number[][]): string[] {
  return options.filter((_o, a) => options.every((_q, b) => p[a][b] >= p[b][a]));
}

describe('schulze against a brute-force reference on seeded random rooms', () => {
  it('gives the strongest paths of every simple path, rank 1 = the winner set, rank = 1 + options that beat it', () => {
    const random = mulberry32(13_2011);
    const pick = (n: number) => Math.floor(random() * n);
    let sharedFirst = 0;
    for (let room = 0; room < 150; room++) {
      // 4–12 voters, 3–8 options, full rankings (the rooms of the issue that found the fault).
      const options = Array.from({ length: 3 + pick(6) }, (_, i) => `o${i}`);
      const ballots: Ballot[] = Array.from({ length: 4 + pick(9) }, () => {
        const out = [...options];
        for (let i = out.length - 1; i > 0; i--) {
          const j = pick(i + 1);
          [out[i], out[j]] = [out[j], out[i]];
        }
        return { ranking: out };
      });
      const ours = schulze(options, ballots);
      const p = referenceStrongest(pairwiseMatrix(options, ballots));
      expect(ours.strongest, `room ${room}`).toEqual(p);
      const winners = referenceWinners(options, p);
      expect(winners.length, `room ${room}`).toBeGreaterThan(0); // Schulze 2011, §4.1: a winner always exists
      expect(ours.ranking.filter((r) => r.rank === 1).map((r) => r.optionId).sort(), `room ${room}`).toEqual(winners.sort());
      for (const row of ours.ranking) {
        const a = options.indexOf(row.optionId);
        const beatenBy = options.filter((_o, b) => p[b][a] > p[a][b]).length;
        expect(row.rank, `room ${room} ${row.optionId}`).toBe(1 + beatenBy);
      }
      if (winners.length > 1) sharedFirst++;
    }
    // The draw must include rooms whose first place is shared, the case that went wrong.
    expect(sharedFirst).toBeGreaterThan(10);
  });
});

describe('cross-check with the votes package on random ballots', () => {
  /** Our ballot in the votes package's shape: one option per rank, the missing ones tied last. */
  function toVotes(options: string[], ballot: Ballot): VotesBallot {
    const ranking = ballot.ranking.map((o) => [o]);
    const missing = options.filter((o) => !ballot.ranking.includes(o));
    return { ranking: missing.length > 0 ? [...ranking, missing] : ranking, weight: ballot.weight ?? 1 };
  }

  /** Groups option ids by rank, best first, each group sorted, as the votes package's `ranking()` does. */
  function groups(rows: { optionId: string; rank: number }[]): string[][] {
    const byRank = new Map<number, string[]>();
    for (const r of rows) byRank.set(r.rank, [...(byRank.get(r.rank) ?? []), r.optionId]);
    return [...byRank.entries()].sort((a, b) => a[0] - b[0]).map(([, ids]) => ids.sort());
  }

  it('agrees on the pairwise table, Borda and Schulze’s options beaten for 60 seeded ballot sets', () => {
    const random = mulberry32(20261201);
    const pick = (n: number) => Math.floor(random() * n);
    const shuffle = (items: string[]) => {
      const out = [...items];
      for (let i = out.length - 1; i > 0; i--) {
        const j = pick(i + 1);
        [out[i], out[j]] = [out[j], out[i]];
      }
      return out;
    };
    let setsWithSharedRanks = 0;
    for (let set = 0; set < 60; set++) {
      const options = Array.from({ length: 2 + pick(6) }, (_, i) => `o${i}`);
      const ballots: Ballot[] = Array.from({ length: 1 + pick(15) }, () => {
        const shuffled = shuffle(options);
        // Some ballots rank only their favourites.
        const listed = random() < 0.3 ? pick(options.length + 1) : options.length;
        return { ranking: shuffled.slice(0, listed), weight: 1 + pick(4) };
      });
      const theirs = ballots.map((b) => toVotes(options, b));
      const totalWeight = theirs.reduce((sum, b) => sum + b.weight, 0);

      const matrix = votesUtils.matrixFromBallots(theirs, options);
      expect(pairwiseMatrix(options, ballots), `set ${set}`).toEqual(matrix.array);

      // The votes package scores n … 1 per ballot (ties averaged), Cairn n−1 … 0: one point per voter apart.
      const theirBorda = new VotesBorda({ candidates: options, ballots: theirs }).scores();
      const ourBorda = borda(options, ballots);
      for (const row of ourBorda) {
        expect(row.points + totalWeight, `set ${set}`).toBeCloseTo(theirBorda[row.optionId], 9);
      }

      // The package's Schulze scores count the options each one beats; its ranking orders by that count,
      // the shortcut that misplaces unbeaten options, so only the counts are compared here.
      const theirSchulze = new VotesSchulze(matrix);
      const ours = schulze(options, ballots);
      const theirWins = theirSchulze.scores();
      for (const row of ours.ranking) expect(row.wins, `set ${set}`).toBe(theirWins[row.optionId]);
      expect(groups(ours.ranking).flat().sort(), `set ${set}`).toEqual([...options].sort());
      if (new Set(ours.ranking.map((r) => r.rank)).size < options.length) setsWithSharedRanks++;
    }
    // The draw must exercise ties too, not only clear orders.
    expect(setsWithSharedRanks).toBeGreaterThan(5);
  });
});
