import type { Role } from '../../../shared/roles';
import { User } from '../models';
import { createUser } from './users';

/** One invented person per role, from the demo field campaign (README, "Demo"). `.test` is reserved (RFC 2606). */
export const DEMO_ACCOUNTS: { email: string; name: string; role: Role; password: string }[] = [
  { email: 'operator@kinefold.test', name: 'Tove Marrick', role: 'operator', password: 'rows-and-furrows-01' },
  { email: 'curator@kinefold.test', name: 'Ilse Brandvold', role: 'curator', password: 'sharp-frames-only-02' },
  { email: 'engineer@kinefold.test', name: 'Nuno Aldebrand', role: 'engineer', password: 'paired-views-build-03' },
  { email: 'admin@kinefold.test', name: 'Petra Halvorsen', role: 'admin', password: 'quota-keeper-admin-04' },
];

/** Creates the demo accounts when the database has no users yet; returns whether it did. */
export async function createDemoAccountsOnFirstStart(bcryptCost: number): Promise<boolean> {
  if ((await User.count()) > 0) return false;
  for (const account of DEMO_ACCOUNTS) await createUser(account, bcryptCost, null);
  return true;
}
