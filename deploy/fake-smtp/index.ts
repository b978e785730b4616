/**
 * Runs the development mail sink and inbox: `node --import tsx deploy/fake-smtp/index.ts`.
 * Settings come from the environment; defaults match deploy/start.sh's local ports.
 */
import { z } from "zod";
import { startFakeSmtp } from "./sink";

const port = z.coerce.number().int().min(1).max(65535);
const envSchema = z.object({
  FAKE_SMTP_PORT: port.default(5182),
  FAKE_INBOX_PORT: port.default(5183),
  FAKE_SMTP_DIR: z.string().min(1).optional(),
});

const env = envSchema.parse(process.env);

const sink = await startFakeSmtp({
  smtpPort: env.FAKE_SMTP_PORT,
  httpPort: env.FAKE_INBOX_PORT,
  ...(env.FAKE_SMTP_DIR ? { storeDir: env.FAKE_SMTP_DIR } : {}),
});
console.log(
  `fake-smtp listening on smtp://127.0.0.1:${env.FAKE_SMTP_PORT}, inbox http://127.0.0.1:${env.FAKE_INBOX_PORT}/`,
);

let stopping = false;
async function stop(): Promise<void> {
  if (stopping) return;
  stopping = true;
  await sink.close();
  process.exit(0);
}
process.on("SIGINT", () => void stop());
process.on("SIGTERM", () => void stop());
