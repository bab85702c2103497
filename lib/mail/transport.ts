import nodemailer, { type SendMailOptions, type SMTPSentMessageInfo, type Transporter } from "nodemailer";
import { readMailConfig, type MailConfig } from "./config";

/**
 * What the sender needs of a transport. A nodemailer transporter fits it; so does a small
 * stand-in in a test, which is why the sender does not ask for the whole Transporter type.
 */
export interface MailTransport {
  sendMail(message: SendMailOptions): Promise<{ messageId?: string | undefined }>;
}

/** A nodemailer SMTP transporter for the given settings (by default, those in the environment). */
export function createMailTransport(config: MailConfig = readMailConfig()): Transporter<SMTPSentMessageInfo> {
  const { smtp } = config;
  return nodemailer.createTransport(
    {
      host: smtp.host,
      port: smtp.port,
      secure: smtp.secure,
      auth: smtp.user !== undefined ? { user: smtp.user, pass: smtp.password ?? "" } : undefined,
      // nodemailer waits up to 2 min to connect and 10 min on a quiet socket by default; a
      // background sender should give up sooner and let the backoff schedule try again.
      connectionTimeout: 10_000,
      greetingTimeout: 10_000,
      socketTimeout: 30_000,
    },
    { from: config.from },
  );
}
