import { Passport } from "passport";
import { Strategy as LocalStrategy } from "passport-local";
import type { AuthService } from "./auth.service.ts";
import { AppError } from "../core/app-error.ts";

/** One Passport instance per app (no global singleton), so several apps can share a process in tests. */
export function createPassport(auth: AuthService) {
  const passport = new Passport();
  passport.use(
    new LocalStrategy({ usernameField: "email", passwordField: "password", passReqToCallback: true }, (req, email, password, done) => {
      auth
        .verifyCredentials(email.trim().toLowerCase(), password, { user: null, ip: req.ip ?? null })
        .then((user) => done(null, user))
        .catch((err: unknown) => (err instanceof AppError && err.code === "invalid_credentials" ? done(null, false) : done(err)));
    }),
  );
  passport.serializeUser((user, done) => done(null, user.id));
  passport.deserializeUser((id: number, done) => {
    auth
      .sessionUser(Number(id))
      .then((user) => done(null, user ?? false))
      .catch((err: unknown) => done(err));
  });
  return passport;
}
