import { z } from 'zod';
import { ACTIVITY_LIBRARY, PHOTO_TYPES } from './activities';
import type { AgendaItem } from './schemas/agenda-item';
import { whole } from './numbers';

/** The usual cautions of a workshop day. */
export const CautionCode = z.enum(['food_allergies', 'movement_access', 'room_capacity', 'photos_personal_data']);
/** A caution's code. */
export type CautionCode = z.infer<typeof CautionCode>;

/** A caution for the plan: what to look after, and the agenda items that raise it. */
export interface Caution {
  code: CautionCode;
  title: string;
  text: string;
  itemIds: string[];
}

/**
 * The cautions a plan raises: food at breaks, movement in icebreakers, the room itself (always,
 * firmer when the headcount passes a known room capacity), and photos. Cairn points to the venue's
 * rules and the organisation's policy; it does not replace them. Refuses a headcount that is not a whole
 * number of 0 or more; a room capacity that is not a whole number of 1 or more is ignored (unknown).
 * @example cautionsFor(items, { headcount: 18, hasPhotos: false }).map((c) => c.code)
 */
export function cautionsFor(
  items: AgendaItem[],
  options: { headcount: number; hasPhotos: boolean; roomCapacity?: number | null },
): Caution[] {
  const cautions: Caution[] = [];

  const food = items.filter((i) => ACTIVITY_LIBRARY[i.type].isBreak && i.settings.snacks === true);
  if (food.length > 0) {
    cautions.push({
      code: 'food_allergies',
      title: 'Food allergies and dietary needs',
      text:
        'Snacks are planned. Ask people about allergies and dietary needs before the day, ' +
        'label what you serve, and keep water within reach.',
      itemIds: food.map((i) => i.id),
    });
  }

  // The item's own setting wins; without one, the activity type's default (icebreakers move).
  const moving = items.filter((i) => i.settings.movement ?? ACTIVITY_LIBRARY[i.type].movement);
  if (moving.length > 0) {
    cautions.push({
      code: 'movement_access',
      title: 'A way in for everyone',
      text:
        'Some activities ask people to move about. Offer a seated way to take part, ' +
        'keep paths clear, and let anyone sit out without having to explain why.',
      itemIds: moving.map((i) => i.id),
    });
  }

  const headcount = whole('The headcount', options.headcount);
  const roomCapacity = Number.isInteger(options.roomCapacity) && options.roomCapacity! > 0 ? options.roomCapacity! : null;
  const overCapacity = roomCapacity !== null && headcount > roomCapacity;
  cautions.push({
    code: 'room_capacity',
    title: 'Room capacity and fire exits',
    text:
      (overCapacity
        ? `You expect ${headcount} people, more than the ${roomCapacity} the room is noted to hold. `
        : `Check that the room holds ${headcount} people plus facilitators. `) +
      "Find the fire exits and keep them clear before people arrive. The venue's rules and local codes come first.",
    itemIds: [],
  });

  const photos = items.filter((i) => PHOTO_TYPES.has(i.type));
  if (photos.length > 0 || options.hasPhotos) {
    cautions.push({
      code: 'photos_personal_data',
      title: 'Photos and personal data',
      text:
        'Photos and names are personal data. Ask before taking pictures of people, show only photos ' +
        "of those who agreed, and follow your organisation's data-protection policy on keeping and sharing them.",
      itemIds: photos.map((i) => i.id),
    });
  }

  return cautions;
}
