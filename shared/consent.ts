// No zod here: the join page imports this file, and the phone's page loads no zod.

/**
 * The data-policy text shown at join when the facilitator has not written one. A phone in another
 * language shows the catalog's translation of it (`join.defaultPolicy`) instead.
 */
export const DEFAULT_CONSENT_TEXT =
  'Cairn keeps the notes, votes and photos you add today so the team can use them after the workshop. ' +
  'Your display name is shown to the facilitators and, where an activity needs it, to your team. ' +
  'Photos that show people are only shown or exported for those who said yes to photos; you can change your answer at any time from your phone. ' +
  'The facilitator can delete names and photos after the workshop; anonymous tallies and notes stay. ' +
  "Your organisation's data-protection policy applies.";

/** Whether a workshop's data-policy text is still Cairn's default (so a phone may show it in its own language). */
export function isDefaultConsent(text: string): boolean {
  return text.trim() === DEFAULT_CONSENT_TEXT.trim();
}
