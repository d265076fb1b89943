import type { Role } from './roles';

/** Every error the API answers with has this body (DESIGN §8). */
export interface ApiErrorBody {
  error: { code: string; message: string; details?: unknown };
}

/** Every list the API answers with has this shape (DESIGN §8). */
export interface ListPage<T> {
  items: T[];
  total: number;
  page: number;
  pageSize: number;
}

export interface UserSummary {
  id: number;
  email: string;
  name: string;
  role: Role;
  disabled: boolean;
  quotaBytes: number | null;
  lastSignInAt: string | null;
  createdAt: string;
}

/** What the signed-in person sees of themselves. */
export type Me = UserSummary;

export interface Health {
  status: 'ok';
  database: 'reachable';
  version: string;
}

export interface CsrfToken {
  token: string;
}

/** Where an invitation stands; `expired` and `pending` can be re-sent, `pending` can be revoked. */
export type InvitationState = 'pending' | 'expired' | 'accepted' | 'revoked';

export interface InvitationSummary {
  id: number;
  email: string;
  role: Role;
  state: InvitationState;
  invitedBy: { id: number; name: string } | null;
  createdAt: string;
  lastSentAt: string;
  expiresAt: string;
  acceptedAt: string | null;
  revokedAt: string | null;
}

/** What the invitation page shows before the person sets a password. */
export interface InvitationPreview {
  email: string;
  role: Role;
  expiresAt: string;
}

/** One message the local fake SMTP server received, as the mail log shows it. */
export interface MailLogEntry {
  id: number;
  to: string;
  subject: string;
  text: string;
  html: string;
  at: string;
}

/** An admin sent someone a password-reset link. */
export interface ResetLinkSent {
  email: string;
  expiresAt: string;
}

/** An answer that only carries a sentence for the person, e.g. after a reset request. */
export interface Notice {
  message: string;
}

/** A person's storage: bytes their clips hold and their own quota (`null` = no personal limit). */
export interface StorageUse {
  usedBytes: number;
  quotaBytes: number | null;
}
