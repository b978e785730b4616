/**
 * The directory behind the development identity provider: the demo scenario's accounts, all sharing
 * one demo password. Lookups are by e-mail (what people type) and by subject (what tokens carry).
 */
import type { Account } from "oidc-provider";
import { DEMO_ACCOUNTS, DEMO_PASSWORD, type DemoAccount } from "../demo/accounts";

export function findDemoAccountBySubject(subject: string): DemoAccount | undefined {
  return DEMO_ACCOUNTS.find((account) => account.subject === subject);
}

/** E-mail addresses compare case-insensitively, as people type them in any case. */
export function findDemoAccountByEmail(email: string): DemoAccount | undefined {
  const wanted = email.trim().toLowerCase();
  return DEMO_ACCOUNTS.find((account) => account.email.toLowerCase() === wanted);
}

/** Returns the account only when both the e-mail is known and the password is the demo password. */
export function checkDemoCredentials(email: string, password: string): DemoAccount | undefined {
  const account = findDemoAccountByEmail(email);
  return account && password === DEMO_PASSWORD ? account : undefined;
}

/** oidc-provider's account hook: the claims the scopes openid, email and profile release. */
export function toOidcAccount(account: DemoAccount): Account {
  return {
    accountId: account.subject,
    claims: () => ({
      sub: account.subject,
      email: account.email,
      email_verified: true,
      name: account.displayName,
    }),
  };
}
