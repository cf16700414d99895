import crypto from 'node:crypto';
import type { Database } from './index';
import { hashPassword } from '../common/passwords';
import { demoAgenda } from './demo-agenda';
import { RuleSettings } from '../../shared/schemas/day-window';
import { DEFAULT_CONSENT_TEXT } from '../../shared/schemas/workshop';

/** The demo accounts, with the passwords the README documents. */
export const DEMO_ACCOUNTS = {
  admin: { email: 'admin@harbourlane.example', name: 'Sam Ashdown', password: 'demo-admin-2026', role: 'admin' as const },
  facilitator: { email: 'mira@harbourlane.example', name: 'Mira Calder', password: 'demo-facilitator-2026', role: 'facilitator' as const },
  observer: { email: 'tomas@harbourlane.example', name: 'Tomas Reed', password: 'demo-observer-2026', role: 'facilitator' as const },
};

/** Title of the demo workshop. */
export const DEMO_WORKSHOP_TITLE = "A new member's first ride";

/**
 * Seeds the invented Harbour Lane Bike Co-op scenario into an empty database: an admin, a
 * facilitator, an observer, and a full-day workshop for 18 participants in three teams.
 * Does nothing when any account exists.
 */
export async function seedDemo(db: Database): Promise<boolean> {
  if ((await db.models.User.count()) > 0) return false;
  const { User, Workshop, AgendaItem, Membership } = db.models;
  const ids: Record<keyof typeof DEMO_ACCOUNTS, string> = { admin: '', facilitator: '', observer: '' };
  const hashes = await Promise.all(Object.values(DEMO_ACCOUNTS).map((a) => hashPassword(a.password)));
  await db.writeTx(async (transaction) => {
    let i = 0;
    for (const [key, a] of Object.entries(DEMO_ACCOUNTS) as [keyof typeof DEMO_ACCOUNTS, (typeof DEMO_ACCOUNTS)['admin']][]) {
      const id = crypto.randomUUID();
      ids[key] = id;
      await User.create({ id, email: a.email, name: a.name, role: a.role, passwordHash: hashes[i++] }, { transaction });
    }
    const workshopId = crypto.randomUUID();
    const { window, items } = demoAgenda(() => crypto.randomUUID());
    await Workshop.create(
      {
        id: workshopId,
        ownerId: ids.facilitator,
        title: DEMO_WORKSHOP_TITLE,
        objective:
          "Harbour Lane Bike Co-op wants a new member's first ride to feel easy and safe: from signing up to " +
          'unlocking a bike, riding, and docking it again. We want to learn where first rides go wrong and leave ' +
          'with one tested idea the volunteers can build next.',
        persona:
          'Priya, 34, moved to the harbour district last month, cycles now and then, signed up for the co-op online ' +
          'and has not yet taken her first ride.',
        date: '2027-03-13',
        window,
        venueNotes:
          'Co-op workshop hall: daylight from the east windows, tables for three teams, one long wall for sticky ' +
          'notes, power strips by the projector, quiet background music during individual work.',
        headcount: 18,
        teamCount: 3,
        roomCapacity: 40,
        consentText: DEFAULT_CONSENT_TEXT,
        rules: RuleSettings.parse({}),
        packed: [],
      },
      { transaction },
    );
    await AgendaItem.bulkCreate(
      items.map((item, position) => ({ ...item, workshopId, position })),
      { transaction },
    );
    await Membership.create({ id: crypto.randomUUID(), workshopId, userId: ids.observer, role: 'observer' }, { transaction });
  });
  return true;
}
