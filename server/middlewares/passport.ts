import { randomUUID } from 'node:crypto';
import passport from 'passport';
import { Strategy as LocalStrategy } from 'passport-local';
import { User } from '../core/models';
import { hashPassword, MIN_BCRYPT_COST, verifyPassword } from '../core/people/passwords';

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

  // Reloading the user on every request makes disabling an account (or changing a role) take effect at once.
  passport.deserializeUser((id: number, done) => {
    User.findByPk(id)
      .then((user) => done(null, user && !user.disabled ? user : false))
      .catch(done);
  });
  return passport;
}
