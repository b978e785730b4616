import type { AdminUser, ApiToken, Group, Invitation, Me, Member } from "@shared/schemas";

// The demo scenario of deploy/demo/accounts.ts: the Halvorsen Institute's two groups and their people.
export const KESTREL_ID = "0b9f3c1e-6a2d-4f8e-9c31-5d7e2a4b6c01";
export const MARROW_ID = "7c2e4a91-3b5f-4d6a-8e02-1f9b3c5d7e02";

export const USER_IDS = {
  ada: "a1d4e7f0-1111-4a2b-8c3d-000000000001",
  noor: "a1d4e7f0-2222-4a2b-8c3d-000000000002",
  tomas: "a1d4e7f0-3333-4a2b-8c3d-000000000003",
  lina: "a1d4e7f0-4444-4a2b-8c3d-000000000004",
  ravi: "a1d4e7f0-5555-4a2b-8c3d-000000000005",
  mei: "a1d4e7f0-6666-4a2b-8c3d-000000000006",
} as const;

const CREATED = "2025-01-13T09:00:00.000Z";

export const kestrel: Group = {
  id: KESTREL_ID,
  slug: "kestrel-plasma-collisions",
  name: "Kestrel Plasma Collisions",
  description: "Electron collisions with plasma-relevant molecules.",
  createdAt: CREATED,
  memberCount: 3,
  myRole: "admin",
};

export const marrow: Group = {
  id: MARROW_ID,
  slug: "marrow-interstellar-chemistry",
  name: "Marrow Interstellar Chemistry",
  description: "Collision data for interstellar chemistry networks.",
  createdAt: CREATED,
  memberCount: 1,
  myRole: "member",
};

const kestrelMembership = {
  groupId: KESTREL_ID,
  groupSlug: kestrel.slug,
  groupName: kestrel.name,
} as const;
const marrowMembership = { groupId: MARROW_ID, groupSlug: marrow.slug, groupName: marrow.name } as const;

export const people = {
  /** Site admin, in no group. */
  ada: {
    user: {
      id: USER_IDS.ada,
      email: "ada.quill@halvorsen.example",
      displayName: "Ada Quill",
      isSiteAdmin: true,
    },
    memberships: [],
    csrfToken: "csrf-ada-7f3a",
  },
  /** Admin of Kestrel and member of Marrow, so the group switcher has two entries. */
  noor: {
    user: {
      id: USER_IDS.noor,
      email: "noor.vasquez@halvorsen.example",
      displayName: "Noor Vasquez",
      isSiteAdmin: false,
    },
    memberships: [
      { ...kestrelMembership, role: "admin" },
      { ...marrowMembership, role: "member" },
    ],
    csrfToken: "csrf-noor-91bc",
  },
  /** Researcher (member) of Kestrel. */
  tomas: {
    user: {
      id: USER_IDS.tomas,
      email: "tomas.brandt@halvorsen.example",
      displayName: "Tomás Brandt",
      isSiteAdmin: false,
    },
    memberships: [{ ...kestrelMembership, role: "member" }],
    csrfToken: "csrf-tomas-22de",
  },
  /** No group yet. */
  mei: {
    user: {
      id: USER_IDS.mei,
      email: "mei.tanaka@halvorsen.example",
      displayName: "Mei Tanaka",
      isSiteAdmin: false,
    },
    memberships: [],
    csrfToken: "csrf-mei-5e10",
  },
} satisfies Record<string, Me>;

export function kestrelMembers(): Member[] {
  return [
    {
      userId: USER_IDS.noor,
      email: people.noor.user.email,
      displayName: "Noor Vasquez",
      role: "admin",
      joinedAt: CREATED,
    },
    {
      userId: USER_IDS.tomas,
      email: people.tomas.user.email,
      displayName: "Tomás Brandt",
      role: "member",
      joinedAt: "2025-02-03T10:30:00.000Z",
    },
    {
      userId: USER_IDS.lina,
      email: "lina.okafor@partner.example",
      displayName: "Lina Okafor",
      role: "collaborator",
      joinedAt: "2025-03-21T14:00:00.000Z",
    },
  ];
}

/** Tomás as a read-only collaborator of his groups: what a collaborator's session looks like. */
export function tomasAsCollaborator(): Me {
  return {
    ...people.tomas,
    memberships: people.tomas.memberships.map((m) => ({ ...m, role: "collaborator" as const })),
  };
}

export function pendingInvitation(overrides: Partial<Invitation> = {}): Invitation {
  return {
    id: "c0ffee00-1234-4abc-9def-000000000001",
    groupId: KESTREL_ID,
    email: "mei.tanaka@halvorsen.example",
    role: "member",
    status: "pending",
    invitedBy: "Noor Vasquez",
    createdAt: "2025-05-02T08:00:00.000Z",
    expiresAt: "2099-05-16T08:00:00.000Z",
    ...overrides,
  };
}

export function apiToken(overrides: Partial<ApiToken> = {}): ApiToken {
  return {
    id: "70ce0000-aaaa-4bbb-8ccc-000000000001",
    name: "cluster-submit",
    prefix: "sf_k3xq",
    createdAt: "2025-04-01T12:00:00.000Z",
    lastUsedAt: null,
    expiresAt: "2099-06-30T12:00:00.000Z",
    ...overrides,
  };
}

export const adminUsers: AdminUser[] = [
  {
    id: USER_IDS.ada,
    email: people.ada.user.email,
    displayName: "Ada Quill",
    isSiteAdmin: true,
    createdAt: CREATED,
    lastSignInAt: "2025-05-05T07:45:00.000Z",
    groupCount: 0,
  },
  {
    id: USER_IDS.mei,
    email: people.mei.user.email,
    displayName: "Mei Tanaka",
    isSiteAdmin: false,
    createdAt: CREATED,
    lastSignInAt: null,
    groupCount: 0,
  },
];
