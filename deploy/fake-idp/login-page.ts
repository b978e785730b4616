/** The Halvorsen Institute sign-in form, with the demo accounts listed for people trying Sigmaflow. */

import { escapeHtml } from "../../shared/html";
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from "../demo/accounts";
import { renderPage } from "./html";

export type LoginPageInput = {
  /** Interaction id; the form posts back to /interaction/<uid>. */
  uid: string;
  /** Name of the application asking for the sign-in, e.g. "Sigmaflow". */
  clientName: string;
  /** Previously typed e-mail, kept after a failed attempt. */
  email?: string;
  errorText?: string;
};

function renderDemoTable(): string {
  const rows = DEMO_ACCOUNTS.map(
    (account) =>
      `<tr><td><code>${escapeHtml(account.email)}</code></td><td>${escapeHtml(account.persona)}</td></tr>`,
  ).join("\n");
  return `<section class="demo" aria-labelledby="demo-heading">
<h2 id="demo-heading">Demo accounts</h2>
<p>Every account uses the password <code>${escapeHtml(DEMO_PASSWORD)}</code>.</p>
<table>
<thead><tr><th scope="col">E-mail</th><th scope="col">Persona</th></tr></thead>
<tbody>
${rows}
</tbody>
</table>
</section>`;
}

export function renderLoginPage(input: LoginPageInput): string {
  const action = `/interaction/${encodeURIComponent(input.uid)}`;
  const alert = input.errorText ? `<p class="alert" role="alert">${escapeHtml(input.errorText)}</p>` : "";
  const body = `<div class="card">
<h1>Sign in</h1>
<p class="lead">to continue to ${escapeHtml(input.clientName)}</p>
${alert}
<form method="post" action="${escapeHtml(action)}" autocomplete="on">
<label for="email">E-mail</label>
<input id="email" name="email" type="email" required autofocus autocomplete="username" value="${escapeHtml(input.email ?? "")}">
<label for="password">Password</label>
<input id="password" name="password" type="password" required autocomplete="current-password">
<button type="submit">Sign in</button>
</form>
${renderDemoTable()}
</div>`;
  return renderPage("Sign in", body);
}
