/**
 * Runs the development identity provider: `node --import tsx deploy/fake-idp/index.ts`.
 * Settings come from the environment; defaults match deploy/start.sh's local ports.
 */
import { z } from "zod";
import { startFakeIdp } from "./provider";

const commaList = z
  .string()
  .transform((value) =>
    value
      .split(",")
      .map((item) => item.trim())
      .filter((item) => item.length > 0),
  )
  .pipe(z.array(z.url()).min(1));

const envSchema = z.object({
  FAKE_IDP_PORT: z.coerce.number().int().min(1).max(65535).default(5181),
  OIDC_CLIENT_ID: z.string().min(1).default("sigmaflow-dev"),
  OIDC_CLIENT_SECRET: z.string().min(1).default("sigmaflow-dev-secret"),
  OIDC_REDIRECT_URIS: commaList.default(["http://127.0.0.1:5180/api/auth/callback"]),
  OIDC_POST_LOGOUT_REDIRECT_URIS: commaList.default(["http://127.0.0.1:5180/"]),
});

const env = envSchema.parse(process.env);

const idp = await startFakeIdp({
  port: env.FAKE_IDP_PORT,
  clientId: env.OIDC_CLIENT_ID,
  clientSecret: env.OIDC_CLIENT_SECRET,
  redirectUris: env.OIDC_REDIRECT_URIS,
  postLogoutRedirectUris: env.OIDC_POST_LOGOUT_REDIRECT_URIS,
});
console.log(`fake-idp listening on ${idp.issuer}`);

let stopping = false;
async function stop(): Promise<void> {
  if (stopping) return;
  stopping = true;
  await idp.close();
  process.exit(0);
}
process.on("SIGINT", () => void stop());
process.on("SIGTERM", () => void stop());
