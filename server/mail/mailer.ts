import nodemailer from 'nodemailer';
import type { AppConfig } from '../deps';

export interface MailMessage {
  to: string;
  subject: string;
  text: string;
  html?: string;
}

export interface Mailer {
  /** Sends through SMTP; resolves once the server has accepted the message. */
  send(msg: MailMessage): Promise<{ messageId: string }>;
  close(): void;
}

export interface MailerTarget {
  host: string;
  port: number;
  secure?: boolean;
  user?: string;
  pass?: string;
  from: string;
}

/** A nodemailer SMTP transport: the local catcher in development and tests, SMTP_* in production. */
export function createMailer(target: MailerTarget): Mailer {
  const local = target.host === '127.0.0.1' || target.host === 'localhost';
  const transport = nodemailer.createTransport({
    host: target.host,
    port: target.port,
    secure: target.secure ?? false,
    auth: target.user ? { user: target.user, pass: target.pass ?? '' } : undefined,
    // The loopback catcher speaks plain SMTP; a real relay must offer STARTTLS.
    ignoreTLS: local,
    requireTLS: !local && !target.secure,
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
    socketTimeout: 20_000,
  });
  return {
    async send(msg) {
      const info = await transport.sendMail({ from: target.from, to: msg.to, subject: msg.subject, text: msg.text, html: msg.html });
      return { messageId: info.messageId };
    },
    close() {
      transport.close();
    },
  };
}

/** The production relay from SMTP_*, or the catcher on the given loopback port. */
export function mailerFor(config: AppConfig, catcherPort?: number): Mailer {
  if (config.smtp) return createMailer({ ...config.smtp, from: config.mailFrom });
  if (!catcherPort) throw new Error('No SMTP_HOST and no local mail catcher port: start the catcher first');
  return createMailer({ host: '127.0.0.1', port: catcherPort, from: config.mailFrom });
}
