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
