import { z } from 'zod';
import { ACTIVITY_LIBRARY, PHOTO_TYPES } from './activities';
import type { AgendaItem } from './schemas/agenda-item';
import { whole } from './numbers';
import type { Finding, MessageTable } from './wording';

/** The usual cautions of a workshop day. */
export const CautionCode = z.enum(['food_allergies', 'movement_access', 'room_capacity', 'photos_personal_data']);
/** A caution's code. */
export type CautionCode = z.infer<typeof CautionCode>;

/**
 * What a screen says of each caution (`caution.text.<message>` in the facilitator catalogs; its heading is
 * `caution.title.<code>`), with the values each message fills in; `n` picks the plural form.
 */
export const CAUTION_MESSAGES = {
  food_allergies: {},
  movement_access: {},
  room_capacity: { n: 'number' },
  room_over_capacity: { n: 'number', capacity: 'number' },
  photos_personal_data: {},
} as const satisfies MessageTable;
/** A message a caution says. */
export type CautionMessage = keyof typeof CAUTION_MESSAGES;

/** A caution for the plan: what to look after (a message and its values, worded by the screen), and the agenda items that raise it. */
export interface Caution extends Finding<CautionMessage> {
  code: CautionCode;
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
      message: 'food_allergies',
      params: {},
      itemIds: food.map((i) => i.id),
    });
  }

  // The item's own setting wins; without one, the activity type's default (icebreakers move).
  const moving = items.filter((i) => i.settings.movement ?? ACTIVITY_LIBRARY[i.type].movement);
  if (moving.length > 0) {
    cautions.push({
      code: 'movement_access',
      message: 'movement_access',
      params: {},
      itemIds: moving.map((i) => i.id),
    });
  }

  const headcount = whole('The headcount', options.headcount);
  const roomCapacity = Number.isInteger(options.roomCapacity) && options.roomCapacity! > 0 ? options.roomCapacity! : null;
  const overCapacity = roomCapacity !== null && headcount > roomCapacity;
  cautions.push({
    code: 'room_capacity',
    message: overCapacity ? 'room_over_capacity' : 'room_capacity',
    params: overCapacity ? { n: headcount, capacity: roomCapacity } : { n: headcount },
    itemIds: [],
  });

  const photos = items.filter((i) => PHOTO_TYPES.has(i.type));
  if (photos.length > 0 || options.hasPhotos) {
    cautions.push({
      code: 'photos_personal_data',
      message: 'photos_personal_data',
      params: {},
      itemIds: photos.map((i) => i.id),
    });
  }

  return cautions;
}
