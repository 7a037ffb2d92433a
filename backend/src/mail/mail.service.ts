import { Injectable, Logger, OnModuleDestroy } from '@nestjs/common';
import { createTransport, type Transporter } from 'nodemailer';
import type { AppConfig } from '../config/config';
import { InjectConfig } from '../config/config.provider';

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  html: string;
  /** Where replies go, e.g. the advisor who sent a summary. */
  replyTo?: string;
}

/**
 * Sends Kinpath's e-mails through the configured SMTP server (the local catcher
 * in development and tests). Plain SMTP: the catcher offers no TLS.
 */
@Injectable()
export class MailService implements OnModuleDestroy {
  private readonly logger = new Logger(MailService.name);
  private transport: Transporter | null = null;

  constructor(@InjectConfig() private readonly config: AppConfig) {}

  async send(mail: OutgoingMail): Promise<void> {
    await this.transporter().sendMail({ from: this.config.smtp.from, ...mail });
    this.logger.log(`Sent "${mail.subject}".`);
  }

  onModuleDestroy(): void {
    this.transport?.close();
  }

  private transporter(): Transporter {
    this.transport ??= createTransport({
      host: this.config.smtp.host,
      port: this.config.smtp.port,
      secure: false,
      ignoreTLS: true,
      connectionTimeout: 5000,
      greetingTimeout: 5000,
      socketTimeout: 10000,
    });
    return this.transport;
  }
}
