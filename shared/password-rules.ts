/**
 * One password rule for every place a password is set (user:add, invitations, resets, changes).
 * Length first: NIST SP 800-63B (2017) §5.1.1.2 favours length over composition rules and asks
 * verifiers to refuse commonly used passwords and ones derived from the account's own details.
 */
export const MIN_PASSWORD_LENGTH = 12;

/** A small list of passwords that people pick most often, and a few a Kinefold user would guess. */
const COMMON_PASSWORDS = new Set([
  '123456789012',
  '1234567890123',
  'password1234',
  'password12345',
  'passwordpassword',
  'qwertyuiopas',
  'qwerty123456',
  '111111111111',
  '000000000000',
  'iloveyou1234',
  'letmein12345',
  'welcome12345',
  'administrator',
  'admin1234567',
  'changeme1234',
  'abcdefghijkl',
  'abc123456789',
  'trustno12345',
  'kinefold1234',
  'kinefoldkinefold',
  'footage12345',
  'password123!',
  'p@ssw0rd1234',
  'qwertyqwerty',
]);

/** Returns what is wrong with the password in words a person can act on, or null when it is fine. */
export function passwordProblem(password: string, email?: string): string | null {
  if (password.length < MIN_PASSWORD_LENGTH) {
    return `Password must be at least ${MIN_PASSWORD_LENGTH} characters long.`;
  }
  const lowered = password.toLowerCase();
  if (email && (lowered === email.toLowerCase() || lowered === email.split('@')[0]?.toLowerCase())) {
    return 'Password must not be your e-mail address.';
  }
  if (COMMON_PASSWORDS.has(lowered)) {
    return 'That password is too common; choose a longer phrase of your own.';
  }
  return null;
}
