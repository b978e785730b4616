import nodemailer from "nodemailer";

/** The mail relay, as the server's and the worker's settings both describe it. */
export type SmtpSettings = {
  host: string;
  port: number;
  secure: boolean;
  auth: { user: string; pass: string } | undefined;
  from: string;
};

export type OutgoingMail = { to: string; subject: string; text: string; html: string };
export type Mailer = { send(mail: OutgoingMail): Promise<void>; close(): void };

/** SMTP delivery through nodemailer (the development sink in deploy/fake-smtp, or a real relay). */
export function createMailer(smtp: SmtpSettings): Mailer {
  const transport = nodemailer.createTransport({
    host: smtp.host,
    port: smtp.port,
    secure: smtp.secure,
    auth: smtp.auth,
    connectionTimeout: 5_000,
    greetingTimeout: 5_000,
    socketTimeout: 10_000,
  });
  return {
    async send(mail) {
      await transport.sendMail({ from: smtp.from, ...mail });
    },
    close: () => transport.close(),
  };
}
