import { z } from 'zod';

/** A team of a live session, with its members and (after a team sort) its challenge. */
export const Team = z.object({
  id: z.string(),
  name: z.string(),
  challenge: z.string().nullable(),
  members: z.array(z.object({ id: z.string(), displayName: z.string() })),
});
/** A team of a live session. */
export type Team = z.infer<typeof Team>;

/** Payload of `teams:form`: split the room into this many teams, as even as possible. */
export const FormTeamsPayload = z.object({ count: z.number().int().min(1).max(12) });

/** Payload of `teams:set`: the teams as the facilitator (or a team sort) decided them. */
export const SetTeamsPayload = z.object({
  teams: z
    .array(
      z.object({
        name: z.string().trim().min(1).max(60),
        challenge: z.string().trim().max(300).nullable().optional(),
        memberIds: z.array(z.string().min(1).max(64)).max(1000),
      }),
    )
    .min(1)
    .max(12),
});
/** Payload of `teams:set`. */
export type SetTeamsPayload = z.infer<typeof SetTeamsPayload>;
