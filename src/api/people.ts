import { http } from './http';
import type { Invitation, InvitationInfo, InviteRole, People } from '../../shared/schemas/member';
import type { SessionAnswer } from '../../shared/schemas/user';

const w = (id: string) => `/workshops/${encodeURIComponent(id)}`;

/** Members and invitations of a workshop. */
export const peopleApi = {
  list: (workshopId: string) => http.get<People>(`${w(workshopId)}/people`),
  invite: (workshopId: string, email: string, role: InviteRole) =>
    http.post<Invitation>(`${w(workshopId)}/invitations`, { email, role }),
  revoke: (workshopId: string, invitationId: string) =>
    http.delete(`${w(workshopId)}/invitations/${encodeURIComponent(invitationId)}`),
  removeMember: (workshopId: string, membershipId: string) =>
    http.delete(`${w(workshopId)}/members/${encodeURIComponent(membershipId)}`),
  info: (token: string) => http.get<InvitationInfo>(`/invitations/${encodeURIComponent(token)}`),
  accept: (token: string) => http.post<{ workshopId: string }>('/invitations/accept', { token }),
  acceptNew: (token: string, name: string, password: string) =>
    http.post<SessionAnswer & { workshopId: string }>('/invitations/accept-new', { token, name, password }),
};
