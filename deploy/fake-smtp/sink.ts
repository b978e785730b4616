/**
 * The development mail sink: an SMTP server that accepts every message without authentication or
 * TLS, parses it and keeps it for the development inbox (HTML pages and JSON API on a second port).
 */
import { randomUUID } from "node:crypto";
import { createServer } from "node:http";
import { type AddressObject, type ParsedMail, simpleParser } from "mailparser";
import { SMTPServer, type SMTPServerDataStream, type SMTPServerSession } from "smtp-server";
import { createInboxHandler } from "./inbox-http";
import { MessageStore, type StoredMessage } from "./message-store";

export type FakeSmtpOptions = {
  smtpPort: number;
  httpPort: number;
  /** Interface for both servers; defaults to 127.0.0.1. */
  host?: string;
  /** When set, messages are kept as JSON files here and read back at start. */
  storeDir?: string;
};

export type FakeSmtp = { close(): Promise<void> };

/** 10 MiB, comfortably above any mail Sigmaflow sends (invitations, job notices). */
const MAX_MESSAGE_BYTES = 10 * 1024 * 1024;

function addressText(value: AddressObject | AddressObject[] | undefined): string | undefined {
  if (!value) return undefined;
  const list = Array.isArray(value) ? value : [value];
  return list.map((entry) => entry.text).join(", ");
}

function toStoredMessage(parsed: ParsedMail, session: SMTPServerSession): StoredMessage {
  const envelopeFrom = session.envelope.mailFrom ? session.envelope.mailFrom.address : "";
  const headers: [string, string][] = [];
  const pushHeader = (name: string, value: string | undefined) => {
    if (value) headers.push([name, value]);
  };
  pushHeader("From", addressText(parsed.from));
  pushHeader("To", addressText(parsed.to));
  pushHeader("Cc", addressText(parsed.cc));
  pushHeader("Reply-To", addressText(parsed.replyTo));
  pushHeader("Subject", parsed.subject);
  pushHeader("Date", parsed.date?.toISOString());
  pushHeader("Message-ID", parsed.messageId);
  return {
    id: randomUUID(),
    receivedAt: new Date().toISOString(),
    from: addressText(parsed.from) ?? envelopeFrom,
    to: session.envelope.rcptTo.map((recipient) => recipient.address),
    subject: parsed.subject ?? "",
    text: parsed.text ?? "",
    html: typeof parsed.html === "string" ? parsed.html : null,
    headers,
  };
}

function smtpError(message: string, responseCode: number): Error {
  return Object.assign(new Error(message), { responseCode });
}

export async function startFakeSmtp(options: FakeSmtpOptions): Promise<FakeSmtp> {
  const host = options.host ?? "127.0.0.1";
  const store = new MessageStore(options.storeDir);
  await store.load();

  const smtp = new SMTPServer({
    banner: "Sigmaflow development mail sink",
    authOptional: true,
    disabledCommands: ["AUTH", "STARTTLS"],
    size: MAX_MESSAGE_BYTES,
    // No DNS lookups for the client's name: faster, and works offline.
    disableReverseLookup: true,
    logger: false,
    onData(stream: SMTPServerDataStream, session: SMTPServerSession, callback) {
      simpleParser(stream)
        .then(async (parsed) => {
          // smtp-server flags oversize mail only once the stream ended.
          if (stream.sizeExceeded) {
            callback(smtpError("Message exceeds the 10 MiB size limit", 552));
            return;
          }
          await store.add(toStoredMessage(parsed, session));
          callback();
        })
        .catch((error: unknown) => {
          console.error("fake-smtp: could not store message", error);
          callback(smtpError("Message could not be stored", 451));
        });
    },
  });
  smtp.on("error", (error) => console.error("fake-smtp: SMTP error", error));

  const inbox = createInboxHandler(store);
  const http = createServer((req, res) => {
    inbox(req, res).catch((error: unknown) => {
      console.error("fake-smtp: inbox request failed", error);
      if (!res.headersSent) res.statusCode = 500;
      res.end();
    });
  });

  await new Promise<void>((resolve, reject) => {
    smtp.server.once("error", reject);
    smtp.listen(options.smtpPort, host, () => {
      smtp.server.off("error", reject);
      resolve();
    });
  });
  await new Promise<void>((resolve, reject) => {
    http.once("error", reject);
    http.listen(options.httpPort, host, () => {
      http.off("error", reject);
      resolve();
    });
  });

  return {
    close: async () => {
      const httpClosed = new Promise<void>((resolve, reject) =>
        http.close((error) => (error ? reject(error) : resolve())),
      );
      // Keep-alive connections (browsers, fetch) would otherwise hold close() open.
      http.closeAllConnections();
      await Promise.all([httpClosed, new Promise<void>((resolve) => smtp.close(() => resolve()))]);
    },
  };
}
