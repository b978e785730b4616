/**
 * The demo scenario's people. The fake identity provider signs them in; the seed gives them their
 * groups and roles. Fictional throughout: the Kestrel Plasma Collisions group and the Marrow
 * Interstellar Chemistry group, at the imaginary Halvorsen Institute.
 */
export const DEMO_PASSWORD = "sigmaflow-demo";

export type DemoAccount = {
  /** Stable OpenID Connect subject. */
  subject: string;
  email: string;
  displayName: string;
  /** What this account shows in the demo, for the start banner and the sign-in page. */
  persona: string;
};

export const DEMO_ACCOUNTS: DemoAccount[] = [
  {
    subject: "demo-site-admin",
    email: "ada.quill@halvorsen.example",
    displayName: "Ada Quill",
    persona: "site admin",
  },
  {
    subject: "demo-group-admin",
    email: "noor.vasquez@halvorsen.example",
    displayName: "Noor Vasquez",
    persona: "group admin, Kestrel Plasma Collisions",
  },
  {
    subject: "demo-researcher",
    email: "tomas.brandt@halvorsen.example",
    displayName: "Tomás Brandt",
    persona: "researcher (member), Kestrel Plasma Collisions",
  },
  {
    subject: "demo-collaborator",
    email: "lina.okafor@partner.example",
    displayName: "Lina Okafor",
    persona: "read-only collaborator, Kestrel Plasma Collisions",
  },
  {
    subject: "demo-other-admin",
    email: "ravi.iyer@halvorsen.example",
    displayName: "Ravi Iyer",
    persona: "group admin, Marrow Interstellar Chemistry",
  },
  {
    subject: "demo-newcomer",
    email: "mei.tanaka@halvorsen.example",
    displayName: "Mei Tanaka",
    persona: "no group yet (receives invitations)",
  },
];
