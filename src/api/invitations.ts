import type { InvitationPreview, InvitationSummary, ListPage, Me } from '../../shared/api-types';
import type { AcceptInvitationBody, InvitationListQuery, InviteBody } from '../../shared/schemas/invitations';
import { forgetCsrfToken, http } from './http';

export const listInvitations = (query: Partial<InvitationListQuery>) =>
  http.get<ListPage<InvitationSummary>>('/invitations', query);

export const invite = (body: InviteBody) => http.post<InvitationSummary>('/invitations', body);

export const resendInvitation = (id: number) => http.post<InvitationSummary>(`/invitations/${id}/resend`);

export const revokeInvitation = (id: number) => http.post<InvitationSummary>(`/invitations/${id}/revoke`);

export const previewInvitation = (token: string) =>
  http.get<InvitationPreview>(`/invitations/${encodeURIComponent(token)}`);

/** Accepting signs the new person in, which gives the session a new id and so a new CSRF token. */
export async function acceptInvitation(token: string, body: AcceptInvitationBody): Promise<Me> {
  const me = await http.post<Me>(`/invitations/${encodeURIComponent(token)}/accept`, body);
  forgetCsrfToken();
  return me;
}
