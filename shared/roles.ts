/** The four roles of Kinefold (DESIGN §1). An admin can do what every other role does. */
export const ROLES = ['operator', 'curator', 'engineer', 'admin'] as const;
export type Role = (typeof ROLES)[number];

/** True when a user with `role` may use something meant for `allowed` roles. */
export function roleAllows(role: Role, allowed: readonly Role[]): boolean {
  return role === 'admin' || allowed.includes(role);
}
