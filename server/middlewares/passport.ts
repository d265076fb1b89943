import { randomUUID } from 'node:crypto';
import passport from 'passport';
import { Strategy as LocalStrategy } from 'passport-local';
import { User } from '../core/models';
import { hashPassword, MIN_BCRYPT_COST, verifyPassword } from '../core/people/passwords';
import { signedInUser } from '../core/people/signed-in-user';

/** Spends the same bcrypt time on unknown e-mail addresses so timing does not reveal which accounts exist. */
let unknownAccountHash: Promise<string> | null = null;
function timingGuardHash(): Promise<string> {
  unknownAccountHash ??= hashPassword(randomUUID(), MIN_BCRYPT_COST);
  return unknownAccountHash;
}

export const WRONG_CREDENTIALS = 'E-mail address or password is wrong.';
export const ACCOUNT_DISABLED = 'This account is disabled; ask an admin to enable it.';

/** Registers the e-mail + password strategy and the session (de)serialisation on passport's singleton. */
export function configurePassport(): typeof passport {
  passport.use(
    new LocalStrategy({ usernameField: 'email', passwordField: 'password' }, (email, password, done) => {
      void (async () => {
        const user = await User.findByEmail(email);
        const matches = await verifyPassword(password, user?.passwordHash ?? (await timingGuardHash()));
        if (!user || !matches) return done(null, false, { message: WRONG_CREDENTIALS });
        if (user.disabled) return done(null, false, { message: ACCOUNT_DISABLED });
        return done(null, user);
      })().catch(done);
    }),
  );

  passport.serializeUser((user, done) => done(null, user.id));

  // The account is read again (at most ACCOUNT_REUSE_MS old) so disabling it or changing its role takes effect.
  passport.deserializeUser((id: number, done) => {
    signedInUser(id)
      .then((user) => done(null, user ?? false))
      .catch(done);
  });
  return passport;
}
