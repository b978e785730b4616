import type { RunDetail } from "@shared/schemas/execution";
import { KESTREL_ID } from "./fixtures";

export const RUN_IDS = {
  running: "5a1e0000-0000-4000-8000-000000000001",
  done: "5a1e0000-0000-4000-8000-000000000002",
};

const base = {
  groupId: KESTREL_ID,
  recipeId: "5a1e0000-0000-4000-8000-0000000000aa",
  hostId: "5a1e0000-0000-4000-8000-0000000000bb",
  stateMessage: null as string | null,
  fingerprint: "c0ffee".repeat(10).slice(0, 64),
  cores: 4,
  wallTimeMinutes: 120,
  reservedCoreHours: 8,
  chargedCoreHours: null as number | null,
  schedulerJobId: null as string | null,
  exitCode: null as number | null,
  resubmittedFrom: null as string | null,
  reusedFrom: null as string | null,
  submittedBy: "Tomás Brandt",
  cancelRequested: false,
  createdAt: "2026-11-30T10:00:00.000Z",
  startedAt: null as string | null,
  finishedAt: null as string | null,
  spec: {
    name: "x",
    recipeId: "5a1e0000-0000-4000-8000-0000000000aa",
    hostId: "5a1e0000-0000-4000-8000-0000000000bb",
    parameters: {},
    resources: { cores: 4, wallTimeMinutes: 120 },
    notifyByEmail: false,
  },
  timings: [] as RunDetail["timings"],
  artifacts: [] as RunDetail["artifacts"],
};

/** Two runs of the Kestrel group's demo study: one on the host now, one finished with its files. */
export function kestrelRuns(): RunDetail[] {
  return [
    {
      ...base,
      id: RUN_IDS.running,
      name: "HNCO cc-pVDZ inner region",
      state: "running",
      stateMessage: "Started on the host",
      schedulerJobId: "4812",
      startedAt: "2026-11-30T10:01:00.000Z",
      spec: { ...base.spec, name: "HNCO cc-pVDZ inner region" },
      events: [
        {
          at: "2026-11-30T10:00:00.000Z",
          fromState: null,
          toState: "queued",
          actor: "user",
          message: "Submitted",
        },
        {
          at: "2026-11-30T10:01:00.000Z",
          fromState: "submitted",
          toState: "running",
          actor: "worker",
          message: "Started on the host",
        },
      ],
      timings: [{ stage: "inner", symmetry: "A'", seconds: 41.5 }],
    },
    {
      ...base,
      id: RUN_IDS.done,
      name: "HNCO elastic, 0.1–10 eV",
      state: "done",
      chargedCoreHours: 1.25,
      schedulerJobId: "4790",
      exitCode: 0,
      finishedAt: "2026-11-29T18:00:00.000Z",
      spec: { ...base.spec, name: "HNCO elastic, 0.1–10 eV" },
      events: [
        {
          at: "2026-11-29T17:00:00.000Z",
          fromState: null,
          toState: "queued",
          actor: "user",
          message: "Submitted",
        },
        {
          at: "2026-11-29T18:00:00.000Z",
          fromState: "collecting",
          toState: "done",
          actor: "worker",
          message: "Finished; 1 result file(s) collected",
        },
      ],
      artifacts: [
        {
          id: "5a1e0000-0000-4000-8000-0000000000cc",
          stage: "outer",
          name: "kmatrix.dat",
          sizeBytes: 2048,
          sha256: "ab".repeat(32),
        },
      ],
    },
  ];
}
