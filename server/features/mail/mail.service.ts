import nodemailer, { type Transporter } from 'nodemailer';
import { SMTPServer } from 'smtp-server';
import { simpleParser } from 'mailparser';
import type { AddressInfo } from 'node:net';

/** A message as the dev inbox keeps it. */
export interface DevMessage {
  id: number;
  receivedAt: string;
  from: string;
  to: string[];
  subject: string;
  text: string;
  html: string | null;
  attachments: { filename: string; contentType: string; size: number }[];
}

/** A local SMTP server that keeps what it receives in memory, for development and tests. */
export class DevSmtpServer {
  readonly messages: DevMessage[] = [];
  private server: SMTPServer;
  private nextId = 1;
  port = 0;

  constructor() {
    this.server = new SMTPServer({
      disabledCommands: ['STARTTLS'],
      authOptional: true,
      logger: false,
      size: 20 * 1024 * 1024,
      onData: (stream, session, callback) => {
        simpleParser(stream)
          .then((mail) => {
            const to = session.envelope.rcptTo.map((r) => r.address);
            this.messages.push({
              id: this.nextId++,
              receivedAt: new Date().toISOString(),
              from: mail.from?.text ?? '',
              to,
              subject: mail.subject ?? '',
              text: mail.text ?? '',
              html: typeof mail.html === 'string' ? mail.html : null,
              attachments: mail.attachments.map((a) => ({
                filename: a.filename ?? 'attachment',
                contentType: a.contentType,
                size: a.size,
              })),
            });
            // Keep the dev inbox small: it is for looking, not for archiving.
            if (this.messages.length > 200) this.messages.shift();
            callback();
          })
          .catch((err: Error) => callback(err));
      },
    });
  }

  /** Starts listening on loopback (port 0 picks a free one). */
  listen(port: number): Promise<number> {
    return new Promise((resolve, reject) => {
      this.server.once('error', reject);
      this.server.listen(port, '127.0.0.1', () => {
        this.port = (this.server.server.address() as AddressInfo).port;
        resolve(this.port);
      });
    });
  }

  /** Stops the server. */
  close(): Promise<void> {
    return new Promise((resolve) => this.server.close(() => resolve()));
  }
}

/** One e-mail Cairn sends. */
export interface OutgoingMail {
  to: string | string[];
  subject: string;
  text: string;
  html?: string;
  attachments?: { filename: string; content: Buffer; contentType: string }[];
}

/** Sends Cairn's e-mail over SMTP; with no SMTP_URL it starts and uses the local dev server. */
export class Mailer {
  private constructor(
    private transport: Transporter,
    private from: string,
    /** The local dev server, when no real SMTP server is configured. */
    readonly dev: DevSmtpServer | null,
  ) {}

  /** Connects to the configured SMTP server, or starts the local dev one. */
  static async create(opts: { smtpUrl: string | null; from: string; devPort: number }): Promise<Mailer> {
    if (opts.smtpUrl) {
      return new Mailer(nodemailer.createTransport(opts.smtpUrl), opts.from, null);
    }
    const dev = new DevSmtpServer();
    const port = await dev.listen(opts.devPort);
    const transport = nodemailer.createTransport({ host: '127.0.0.1', port, secure: false, ignoreTLS: true });
    return new Mailer(transport, opts.from, dev);
  }

  /** Sends one message and waits until the SMTP server accepted it. */
  async send(mail: OutgoingMail): Promise<void> {
    await this.transport.sendMail({ from: this.from, ...mail });
  }

  /** Closes the transport and the dev server. */
  async close(): Promise<void> {
    this.transport.close();
    await this.dev?.close();
  }
}
