import type { GlobalRole } from '../../shared/schemas/user';

/** A role that may be allowed on a workshop route: the per-workshop roles plus the global admin. */
export type WorkshopAccessRole = 'owner' | 'cofacilitator' | 'observer' | 'admin';

/** Who may call a route; every route declares one. */
export type Access =
  | { kind: 'public' }
  | { kind: 'signedIn' }
  | { kind: 'global'; roles: GlobalRole[] }
  | { kind: 'workshop'; roles: WorkshopAccessRole[]; param: string }
  | { kind: 'participant' };

/** Ready-made access declarations for routes. */
export const access = {
  /** Anyone, signed in or not. */
  public: { kind: 'public' } as Access,
  /** Any signed-in account. */
  signedIn: { kind: 'signedIn' } as Access,
  /** Accounts with one of the global roles. */
  global: (...roles: GlobalRole[]): Access => ({ kind: 'global', roles }),
  /** Accounts holding one of the roles on the workshop named by a path parameter. */
  workshop: (roles: WorkshopAccessRole[], param = 'workshopId'): Access => ({ kind: 'workshop', roles, param }),
  /** A participant holding a session token. */
  participant: { kind: 'participant' } as Access,
};

/** Roles that read a workshop. */
export const READ_ROLES: WorkshopAccessRole[] = ['owner', 'cofacilitator', 'observer', 'admin'];
/** Roles that plan and run a workshop. */
export const EDIT_ROLES: WorkshopAccessRole[] = ['owner', 'cofacilitator'];
/** Roles that own a workshop (delete, invite, re-assign). */
export const OWNER_ROLES: WorkshopAccessRole[] = ['owner'];

/** Describes an access declaration in plain words (for the API document). */
export function describeAccess(a: Access): string {
  switch (a.kind) {
    case 'public':
      return 'anyone';
    case 'signedIn':
      return 'any signed-in account';
    case 'global':
      return `accounts with role ${a.roles.join(' or ')}`;
    case 'workshop':
      return `on this workshop: ${a.roles.join(', ')}`;
    case 'participant':
      return 'a participant of the live session';
  }
}
