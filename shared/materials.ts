import { ACTIVITY_LIBRARY, MATERIALS, MATERIAL_KEYS, MATERIAL_WHYS, type MaterialKey, type MaterialRule, type MaterialWhy } from './activities';
import type { AgendaItem } from './schemas/agenda-item';
import { whole } from './numbers';
import type { Finding, MessageTable } from './wording';

/**
 * How one item's share of a material is made, so it can be checked by hand: the packing list says
 * `packingHow.<per>` from the facilitator catalogs with these values (counts with their nouns, e.g. "24 people").
 */
export const PACKING_HOW = {
  person: { factor: 'number', people: 'people', total: 'number' },
  team: { factor: 'number', teams: 'teams', total: 'number' },
  fixed: { n: 'number' },
  voter_dot: { dots: 'dots', criteria: 'criteria', people: 'people', factor: 'number', total: 'number' },
} as const satisfies MessageTable;

/** One line of the packing list: the material (named by the catalogs, `material.<key>`) and how many. */
export interface PackingLine {
  key: MaterialKey;
  quantity: number;
  /** The agenda items that need it, in agenda order. */
  usedBy: string[];
  /** How the quantity is made: each activity's share, its sum and its reason, for the screen to word. */
  shares: { itemId: string; title: string; quantity: number; how: Finding<MaterialRule['per']>; why: Finding<MaterialWhy> }[];
  /** Added up over the activities (used up), or the most any one activity needs (used again). */
  adds: 'sum' | 'max';
  /** Dot stickers when the votes run on the phones: a paper fallback, not a requirement. */
  fallback: boolean;
}

// A factor as the packing list gives it: 1.5 stays 1.5, 2 stays 2.
const num = (n: number) => Math.round(n * 100) / 100;

// How one item's share of a material is made, as values for the screen's words.
function shareHow(rule: MaterialRule, item: AgendaItem, headcount: number, teamCount: number, quantity: number): Finding<MaterialRule['per']> {
  switch (rule.per) {
    case 'person':
      return { message: 'person', params: { factor: num(rule.quantity), people: headcount, total: num(quantity) } };
    case 'team':
      return { message: 'team', params: { factor: num(rule.quantity), teams: teamCount, total: num(quantity) } };
    case 'fixed':
      return { message: 'fixed', params: { n: num(quantity) } };
    case 'voter_dot': {
      const dots = item.settings.dotsPerVoter ?? ACTIVITY_LIBRARY[item.type].defaultSettings.dotsPerVoter ?? 1;
      const criteria = Math.max(1, item.settings.criteria?.length ?? 0);
      return { message: 'voter_dot', params: { dots, criteria, people: headcount, factor: num(rule.quantity), total: num(quantity) } };
    }
  }
}

// Why one rule asks for what it does, with its quantity where the words name it ("about 15 notes each").
function shareWhy(rule: MaterialRule): Finding<MaterialWhy> {
  return { message: rule.why, params: 'n' in MATERIAL_WHYS[rule.why] ? { n: rule.quantity } : {} };
}

// How much of a material one item asks for under one rule.
function ruleQuantity(rule: MaterialRule, item: AgendaItem, headcount: number, teamCount: number): number {
  switch (rule.per) {
    case 'person':
      return rule.quantity * headcount;
    case 'team':
      return rule.quantity * teamCount;
    case 'fixed':
      return rule.quantity;
    case 'voter_dot': {
      const dots = item.settings.dotsPerVoter ?? ACTIVITY_LIBRARY[item.type].defaultSettings.dotsPerVoter ?? 1;
      const criteria = Math.max(1, item.settings.criteria?.length ?? 0);
      return Math.ceil(dots * criteria * headcount * rule.quantity);
    }
  }
}

/**
 * The packing list for an agenda: each item's material rules for the headcount and teams, added up.
 * Consumables (sticky notes, paper, dots, snacks, water) are summed over the items; things used
 * again (markers, tape, projector, tablet, whiteboard, timer) take the largest any one item needs.
 * Quantities are rounded up to whole units; lines that come to nothing are left out. Refuses a headcount
 * or team count that is not a whole number of 0 or more (RangeError naming it).
 * @example packingList(items, 18, 3).find((l) => l.key === 'dot_stickers')?.quantity // 162 for 3 dots × 2 criteria
 */
export function packingList(items: AgendaItem[], headcount: number, teamCount: number): PackingLine[] {
  whole('The headcount', headcount);
  whole('The number of teams', teamCount);
  const lines = new Map<MaterialKey, { quantity: number; usedBy: Set<string>; shares: PackingLine['shares'] }>();
  for (const item of items) {
    for (const rule of ACTIVITY_LIBRARY[item.type].materials) {
      if (rule.onlyIfSetting && item.settings[rule.onlyIfSetting] !== true) continue;
      const quantity = ruleQuantity(rule, item, headcount, teamCount);
      let line = lines.get(rule.item);
      if (!line) {
        line = { quantity: 0, usedBy: new Set(), shares: [] };
        lines.set(rule.item, line);
      }
      line.quantity = MATERIALS[rule.item].consumable ? line.quantity + quantity : Math.max(line.quantity, quantity);
      line.usedBy.add(item.id);
      line.shares.push({ itemId: item.id, title: item.title, quantity, how: shareHow(rule, item, headcount, teamCount, quantity), why: shareWhy(rule) });
    }
  }
  // Lines in the catalogue's order, so the list reads the same every time.
  return MATERIAL_KEYS.flatMap((key) => {
    const line = lines.get(key);
    if (!line) return [];
    const quantity = Math.ceil(line.quantity);
    if (quantity <= 0) return [];
    return [
      {
        key,
        quantity,
        usedBy: [...line.usedBy],
        shares: line.shares,
        adds: MATERIALS[key].consumable ? ('sum' as const) : ('max' as const),
        // Cairn's dot votes run on the phones; the stickers are there if the room has to vote on paper.
        fallback: key === 'dot_stickers',
      },
    ];
  });
}
