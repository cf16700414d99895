import { z } from 'zod';
import { DayWindow, RuleSettings } from './day-window';
import { AgendaItem } from './agenda-item';
import { WorkshopRole } from './user';

export { DEFAULT_CONSENT_TEXT } from '../consent';

/**
 * Whether `YYYY-MM-DD` names a day of the (proleptic Gregorian) calendar: month 01–12, and a day
 * the month has (29 February only in a leap year).
 * @example isCalendarDate('2027-02-30') // false
 */
export function isCalendarDate(value: string): boolean {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(value);
  if (!m) return false;
  const [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])];
  const day = new Date(Date.UTC(y, mo - 1, d));
  // Date.UTC rolls impossible dates over (2027-02-30 becomes 2027-03-02): a real date comes back unchanged.
  return mo >= 1 && mo <= 12 && day.getUTCFullYear() === y && day.getUTCMonth() === mo - 1 && day.getUTCDate() === d;
}

/** A calendar date as `YYYY-MM-DD`, one that exists. */
export const IsoDate = z
  .string()
  .refine((s) => /^\d{4}-\d{2}-\d{2}$/.test(s), { message: 'Use a date such as 2027-03-14', params: { reason: 'date_format' }, abort: true })
  .refine(isCalendarDate, { message: 'That day does not exist; check the month and the day', params: { reason: 'no_such_day' } });

/** The brief of a workshop: what the facilitator fills in before planning the agenda. */
export const WorkshopBrief = z.object({
  title: z.string().trim().min(3, 'Give the workshop a title of at least 3 characters').max(120, 'Keep the title under 120 characters'),
  objective: z.string().trim().min(1, 'Say what the organisation wants to learn or improve').max(2000),
  persona: z.string().trim().max(1000, 'Keep the persona short (under 1000 characters)'),
  date: IsoDate,
  window: DayWindow,
  venueNotes: z.string().max(2000, 'Keep venue notes under 2000 characters'),
  headcount: z
    .number({ error: (issue) => (issue.input === undefined || issue.input === null || issue.input === '' ? 'The headcount is required' : 'Enter a whole number') })
    .int('Enter a whole number')
    .min(2, 'A workshop needs at least 2 participants')
    .max(500, 'Cairn plans for at most 500 participants'),
  teamCount: z.number().int().min(1).max(12),
  roomCapacity: z.number().int().min(0).max(2000).nullable(),
  consentText: z.string().trim().min(1, 'The data-policy text cannot be empty').max(4000),
  rules: RuleSettings,
});
/** The brief of a workshop. */
export type WorkshopBrief = z.infer<typeof WorkshopBrief>;

/** Body that creates a workshop: a brief (defaults filled in) and an optional template. */
export const CreateWorkshopBody = WorkshopBrief.partial({
  persona: true,
  venueNotes: true,
  teamCount: true,
  roomCapacity: true,
  consentText: true,
  rules: true,
  window: true,
}).extend({
  templateId: z.enum(['full-day', 'half-day']).optional(),
});
/** Body that creates a workshop. */
export type CreateWorkshopBody = z.infer<typeof CreateWorkshopBody>;

/** Body that changes a workshop's brief (any subset). */
export const UpdateWorkshopBody = WorkshopBrief.partial();
/** Body that changes a workshop's brief. */
export type UpdateWorkshopBody = z.infer<typeof UpdateWorkshopBody>;

/** A workshop as listed for the signed-in person. */
export const WorkshopSummary = z.object({
  id: z.string(),
  title: z.string(),
  date: z.string(),
  headcount: z.number(),
  ownerName: z.string(),
  myRole: WorkshopRole.or(z.literal('admin')),
  itemCount: z.number(),
  updatedAt: z.string(),
});
/** A workshop as listed. */
export type WorkshopSummary = z.infer<typeof WorkshopSummary>;

/** A workshop with its brief, agenda and packing state. */
export const Workshop = WorkshopBrief.extend({
  id: z.string(),
  ownerId: z.string(),
  ownerName: z.string(),
  myRole: WorkshopRole.or(z.literal('admin')),
  agenda: z.array(AgendaItem),
  packed: z.array(z.string()),
  createdAt: z.string(),
  updatedAt: z.string(),
});
/** A workshop with its brief, agenda and packing state. */
export type Workshop = z.infer<typeof Workshop>;
