import type { IncomingMessage, ServerResponse } from 'node:http';
import type { RequestHandler } from 'express';
import session from 'express-session';
import passportModule from 'passport';
import { Strategy as LocalStrategy } from 'passport-local';
import type { SessionUser } from '../../shared/api/auth.js';
import type { AppContext } from '../context.js';
import { LoginThrottle } from './login-throttle.js';
import { verifyAgainstDummy, verifyPassword } from './password.js';
import { DrizzleSessionStore } from './session-store.js';
import { findActiveUser, findUserByEmail, toSessionUser } from './users.js';

export const SESSION_COOKIE = 'nullsmith.sid';

/** Why the local strategy refused a sign-in (passed as passport's `info`). */
export interface LoginRefusal {
  message: 'invalid_credentials' | 'disabled';
}

export interface AuthKit {
  passport: passportModule.Authenticator;
  session: RequestHandler;
  store: DrizzleSessionStore;
  throttle: LoginThrottle;
}

const kits = new WeakMap<AppContext, AuthKit>();

/**
 * Session, passport and sign-in throttle of one app, built once per context so the HTTP app
 * and the WebSocket upgrade check (userFromUpgrade) share them. A passport instance of our own,
 * not the module singleton, so several servers can run in one process (tests).
 */
export function authKit(ctx: AppContext): AuthKit {
  let kit = kits.get(ctx);
  if (!kit) {
    kit = buildKit(ctx);
    kits.set(ctx, kit);
  }
  return kit;
}

function buildKit(ctx: AppContext): AuthKit {
  const { db, config } = ctx;
  const passport = new passportModule.Authenticator();
  passport.use(
    new LocalStrategy({ usernameField: 'email', passwordField: 'password', session: true }, (email, password, done) => {
      (async () => {
        const row = await findUserByEmail(db, email);
        if (!row) {
          await verifyAgainstDummy(password);
          return done(null, false, { message: 'invalid_credentials' } satisfies LoginRefusal);
        }
        if (!(await verifyPassword(password, row.passwordHash))) return done(null, false, { message: 'invalid_credentials' } satisfies LoginRefusal);
        if (row.disabled) return done(null, false, { message: 'disabled' } satisfies LoginRefusal);
        done(null, toSessionUser(row));
      })().catch((err: unknown) => done(err));
    }),
  );
  passport.serializeUser<number>((user, done) => done(null, user.id));
  // Read the user on every request, so a disabled account or a changed role takes effect at once.
  passport.deserializeUser<number>((id, done) => {
    findActiveUser(db, id).then((u) => done(null, u ?? false), done);
  });

  const store = new DrizzleSessionStore(db, config.sessionMaxAgeMs);
  const sessionMiddleware = session({
    name: SESSION_COOKIE,
    secret: ctx.sessionSecret,
    store,
    resave: false,
    saveUninitialized: false,
    rolling: true,
    proxy: config.trustProxy !== false ? true : undefined,
    cookie: { httpOnly: true, sameSite: 'lax', secure: config.cookieSecure, maxAge: config.sessionMaxAgeMs, path: '/' },
  });
  return { passport, session: sessionMiddleware, store, throttle: new LoginThrottle(db) };
}

/**
 * The signed-in user behind a raw HTTP request (a WebSocket upgrade), from its session cookie;
 * undefined when it has none or the account is gone or disabled. The live-channel code calls
 * this before accepting an upgrade.
 */
export function userFromUpgrade(ctx: AppContext, req: IncomingMessage): Promise<SessionUser | undefined> {
  const kit = authKit(ctx);
  return new Promise((resolve, reject) => {
    // express-session only wraps res.end / writeHead; an empty stand-in is enough here.
    kit.session(req as never, {} as ServerResponse as never, (err?: unknown) => {
      if (err) return reject(err);
      const sess = (req as IncomingMessage & { session?: { passport?: { user?: number } } }).session;
      const id = sess?.passport?.user;
      if (typeof id !== 'number') return resolve(undefined);
      findActiveUser(ctx.db, id).then(resolve, reject);
    });
  });
}
