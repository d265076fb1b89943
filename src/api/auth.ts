import type { Me } from '../../shared/api-types';
import type { SignInBody } from '../../shared/schemas/auth';
import { forgetCsrfToken, http } from './http';

export async function signIn(body: SignInBody): Promise<Me> {
  const me = await http.post<Me>('/auth/sign-in', body);
  forgetCsrfToken();
  return me;
}

export async function signOut(): Promise<void> {
  await http.post<void>('/auth/sign-out');
  forgetCsrfToken();
}

export const fetchMe = () => http.get<Me>('/me');
