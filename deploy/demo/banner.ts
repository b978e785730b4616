/** Prints where Sigmaflow is running and who can sign in (deploy/start.sh calls it once all is up). */
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from "./accounts";

const appUrl = process.env.SIGMAFLOW_PUBLIC_URL ?? "http://127.0.0.1:5180";
const inboxUrl = process.env.INBOX_URL ?? "http://127.0.0.1:5183/";
const rows = DEMO_ACCOUNTS.map((a) => `    ${a.email.padEnd(34)} ${a.persona}`);
console.log(
  [
    "",
    "  Sigmaflow is running.",
    "",
    `    App:                 ${appUrl}`,
    `    Development inbox:   ${inboxUrl}`,
    `    Development host:    127.0.0.1:${process.env.FAKE_CLUSTER_PORT ?? "5184"} (SSH, registered as kestrel-dev)`,
    "",
    `  Demo accounts (password for all: ${DEMO_PASSWORD}):`,
    ...rows,
    "",
    "  Demo science (Kestrel Plasma Collisions): targets water, heavy water, NF3, HCO+, methane and CH3D;",
    "  recipes orbitals-to-ionization and orbitals-to-elastic; the demo runs compute on kestrel-dev now and",
    "  show results within a minute or two. Monodeuteromethane is left for you to submit.",
    "  Computed cross sections are model results: validate them before use in design work.",
    "",
    "  Press Ctrl-C to stop everything this command started.",
    "",
  ].join("\n"),
);
