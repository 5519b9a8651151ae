import type { ServerPlugin } from '../plugins.js';
import { digestIfDue } from './daily-digest.js';
import { mailJobOutcome } from './job-outcome-mail.js';
import { loadMailConfig, type MailConfig } from './mail-config.js';
import { Mailer } from './mailer.js';
import { LocalSmtpReceiver } from './smtp-receiver.js';

export interface MailService {
  config: MailConfig;
  mailer: Mailer;
  /** Only in local mode. */
  receiver?: LocalSmtpReceiver;
  stop(): Promise<void>;
}

declare module '../context.js' {
  interface AppServices {
    /** Outgoing mail (job outcomes, digests, invitations) and, locally, the Outbox receiver. */
    mail?: MailService;
  }
}

const DIGEST_CHECK_MS = 60_000;

/**
 * Mail: starts the local SMTP receiver unless SMTP_HOST names a relay, builds the mailer,
 * mails job outcomes from `job:state` events and checks once a minute whether the morning
 * digest is due. Listed after the queue plugin (it needs ctx.services.events).
 */
export const mailPlugin: ServerPlugin = {
  name: 'mail',
  async start(ctx) {
    const config = loadMailConfig(process.env, `http://${ctx.config.host}:${ctx.config.port}`);
    const log = (level: 'info' | 'warn' | 'error', message: string) => ctx.logger[level](message);
    let receiver: LocalSmtpReceiver | undefined;
    if (config.mode === 'local') {
      receiver = new LocalSmtpReceiver(ctx.db, (m) => log('error', m));
      await receiver.start(config.receiverPort);
      log('info', `mail: local outbox receiver on 127.0.0.1:${receiver.port} (set SMTP_HOST to send through a real relay)`);
    }
    const mailer = new Mailer(ctx.db, config, receiver?.port ?? 0, log);
    const onState = (e: Parameters<typeof mailJobOutcome>[3]) => {
      mailJobOutcome(ctx.db, mailer, config, e).catch((err: unknown) => log('error', `mail for job ${e.jobId} failed: ${(err as Error).message}`));
    };
    ctx.services.events?.on('job:state', onState);
    let checking = false;
    const timer = setInterval(() => {
      if (checking) return;
      checking = true;
      digestIfDue(ctx.db, mailer, config)
        .catch((err: unknown) => log('error', `morning digest failed: ${(err as Error).message}`))
        .finally(() => (checking = false));
    }, DIGEST_CHECK_MS);
    timer.unref();
    ctx.services.mail = {
      config,
      mailer,
      receiver,
      async stop() {
        clearInterval(timer);
        ctx.services.events?.off('job:state', onState);
        await mailer.close();
        await receiver?.stop();
      },
    };
  },
  attach(ctx, server) {
    // Without PUBLIC_URL, links in mail point at the address this server really listens on
    // (PORT=0 picks the port only when listening starts).
    const mail = ctx.services.mail;
    if (!mail || process.env.PUBLIC_URL) return;
    server.once('listening', () => {
      const a = server.address();
      if (a && typeof a === 'object') mail.config.publicUrl = `http://${a.family === 'IPv6' ? `[${a.address}]` : a.address}:${a.port}`;
    });
  },
  async stop(ctx) {
    await ctx.services.mail?.stop();
  },
};
