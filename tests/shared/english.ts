import { facilitatorWording } from '../../server/common/catalogs';
import { MATERIAL_WHYS } from '../../shared/activities';
import { CAUTION_MESSAGES, type Caution } from '../../shared/cautions';
import { PACKING_HOW, type PackingLine } from '../../shared/materials';
import { RULE_MESSAGES, SCHEDULE_MESSAGES, ruleWhy, type ScheduleWarning } from '../../shared/schedule';
import { sayFinding } from '../../shared/wording';

// What the English screens say of the shared rules' findings, from the English facilitator catalog (as the screens
// and the server's report word them), so tests can read the words a facilitator reads.
const en = facilitatorWording('en');

/** A schedule warning's message as the English plan says it. */
export const warningText = (w: ScheduleWarning): string => sayFinding(en, 'scheduleWarning', SCHEDULE_MESSAGES, w);
/** Why a broken rule matters, as the English plan says it. */
export const ruleText = (w: ScheduleWarning): string => sayFinding(en, 'scheduleRule', RULE_MESSAGES, ruleWhy(w.code));
/** A caution's heading and text as the English plan says them. */
export const cautionTitle = (c: Caution): string => en.t(`caution.title.${c.code}`);
/** A caution's text as the English plan says it. */
export const cautionText = (c: Caution): string => sayFinding(en, 'caution.text', CAUTION_MESSAGES, c);
/** A packing line's material and amount as the English packing list says them ("Dot stickers", "162 dots"). */
export const materialName = (l: PackingLine): string => en.t(`material.${l.key}.name`);
/** A packing line's amount as the English packing list says it ("162 dots"). */
export const amountText = (l: PackingLine): string => en.t(`material.${l.key}.amount`, { n: en.num(l.quantity) }, l.quantity);
/** How a share is made, as the English packing list says it. */
export const howText = (s: PackingLine['shares'][number]): string => sayFinding(en, 'packingHow', PACKING_HOW, s.how);
/** Why a share is that many, as the English packing list says it. */
export const whyText = (s: PackingLine['shares'][number]): string => sayFinding(en, 'packingWhy', MATERIAL_WHYS, s.why);
/** A fixed word of the PDF report as the English report says it (`reportFile.pdf.<key>`). */
export const reportWord = (key: string, params: Record<string, string | number> = {}, plural?: number): string => en.t(`reportFile.pdf.${key}`, params, plural);
/** A fixed word of the CSV exports as the English files say it (`reportFile.csv.<key>`: headers, yes, no, …). */
export const csvWord = (key: string, params: Record<string, string | number> = {}): string => en.t(`reportFile.csv.${key}`, params);
/** An English CSV header, column by column from the catalog. */
export const csvHeader = (...keys: string[]): string[] => keys.map((k) => csvWord(k));
