import { Router, type NextFunction, type Request, type Response } from 'express';
import { loginRequestSchema, type SessionResponse, type SessionUser } from '../../shared/api/auth.js';
import { authKit, SESSION_COOKIE, type LoginRefusal } from '../auth/auth-kit.js';
import { requireUser } from '../auth/require-role.js';
import { normalizeEmail } from '../auth/users.js';
import type { AppContext } from '../context.js';
import { HttpError } from '../http/http-error.js';

/** /api/auth: sign in, sign out, who am I. */
export function authRouter(ctx: AppContext): Router {
  const router = Router();
  const { passport, throttle } = authKit(ctx);

  router.post('/login', async (req, res, next) => {
    const body = loginRequestSchema.parse(req.body ?? {});
    const account = normalizeEmail(body.email);
    const address = req.ip ?? 'unknown';
    const wait = await throttle.retryAfterS(address, account);
    if (wait > 0) throw tooManyAttempts(res, wait);

    const { user, refusal } = await authenticate(passport, req, res, next);
    if (!user) {
      if (refusal?.message === 'disabled') {
        throw new HttpError(403, 'account_disabled', 'This account is disabled. Ask an administrator to enable it.');
      }
      await throttle.recordFailure(address, account);
      ctx.logger.info('sign-in refused', { account, address });
      throw new HttpError(401, 'invalid_credentials', 'E-mail or password is wrong.');
    }
    await throttle.recordSuccess(account);
    // passport >= 0.6 regenerates the session here: a session id planted before sign-in is discarded.
    await new Promise<void>((resolve, reject) => req.logIn(user, (err: unknown) => (err ? reject(err) : resolve())));
    ctx.logger.info('signed in', { userId: user.id });
    const out: SessionResponse = { user };
    res.json(out);
  });

  router.post('/logout', async (req, res) => {
    const userId = req.user?.id;
    if (req.session) await new Promise<void>((resolve, reject) => req.session.destroy((err: unknown) => (err ? reject(err) : resolve())));
    res.clearCookie(SESSION_COOKIE, { path: '/' });
    if (userId) ctx.logger.info('signed out', { userId });
    res.status(204).end();
  });

  router.get('/me', requireUser, (req, res) => {
    const out: SessionResponse = { user: req.user as SessionUser };
    res.json(out);
  });

  return router;
}

function authenticate(
  passport: ReturnType<typeof authKit>['passport'],
  req: Request,
  res: Response,
  next: NextFunction,
): Promise<{ user?: SessionUser; refusal?: LoginRefusal }> {
  return new Promise((resolve, reject) => {
    passport.authenticate('local', { session: false }, (err: unknown, user: SessionUser | false, info?: LoginRefusal) => {
      if (err) return reject(err);
      resolve(user ? { user } : { refusal: info });
    })(req, res, next);
  });
}

function tooManyAttempts(res: Response, waitS: number): HttpError {
  res.set('Retry-After', String(waitS));
  const minutes = Math.ceil(waitS / 60);
  return new HttpError(
    429,
    'too_many_attempts',
    `Too many failed sign-ins. Wait ${minutes} minute${minutes === 1 ? '' : 's'} and try again, or ask an administrator to reset your password.`,
    { retryAfterS: waitS },
  );
}
