import { z } from 'zod';
import type { InvitationState } from '../api-types';
import { ROLES } from '../roles';
import { listQuerySchema } from './list-query';
import { oneTimeTokenSchema } from './one-time-token';
import { emailSchema, newPasswordSchema, personNameSchema } from './people';

export const INVITATION_STATES = ['pending', 'expired', 'accepted', 'revoked'] as const satisfies InvitationState[];
export const INVITATION_SORT_FIELDS = ['email', 'role', 'createdAt', 'expiresAt'] as const;

export const inviteSchema = z.strictObject({
  email: emailSchema,
  role: z.enum(ROLES),
});
export type InviteBody = z.infer<typeof inviteSchema>;

export const invitationListQuerySchema = listQuerySchema(INVITATION_SORT_FIELDS).extend({
  state: z.enum(INVITATION_STATES).optional(),
  search: z.string().trim().max(200).optional(),
});
export type InvitationListQuery = z.infer<typeof invitationListQuerySchema>;

export const invitationTokenParamsSchema = z.strictObject({ token: oneTimeTokenSchema });

export const acceptInvitationSchema = z.strictObject({
  name: personNameSchema,
  password: newPasswordSchema,
});
export type AcceptInvitationBody = z.infer<typeof acceptInvitationSchema>;
