import type { RunDetail } from "@shared/schemas";
import { KESTREL_ID, USER_IDS } from "./fixtures";

export const RUN_IDS = {
  running: "5a1e0000-0000-4000-8000-000000000001",
  done: "5a1e0000-0000-4000-8000-000000000002",
  reused: "5a1e0000-0000-4000-8000-000000000003",
  cancelled: "5a1e0000-0000-4000-8000-000000000004",
};

const base = {
  groupId: KESTREL_ID,
  recipeId: "5a1e0000-0000-4000-8000-0000000000aa",
  hostId: "5a1e0000-0000-4000-8000-0000000000bb",
  targetId: null as string | null,
  targetVersion: null as number | null,
  targetName: null as string | null,
  resultsState: null as RunDetail["resultsState"],
  resultsMessage: null as string | null,
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
  submittedById: USER_IDS.tomas as string | null,
  submittedByName: "Tomás Brandt" as string | null,
  cancelRequested: false,
  cancelRequestedByName: null as string | null,
  progress: null as RunDetail["progress"],
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

/**
 * Runs of the Kestrel group's demo study: one on the host now (in its second stage), one finished with
 * its files, one that reused the finished one's results, and one cancelled by a group admin.
 */
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
      progress: { stage: "outer", stageIndex: 2, stageCount: 3, done: 3, total: 12, percent: 25 },
      spec: { ...base.spec, name: "HNCO cc-pVDZ inner region" },
      events: [
        {
          at: "2026-11-30T10:00:00.000Z",
          fromState: null,
          toState: "queued",
          actor: "user",
          actorName: "Tomás Brandt",
          message: "Submitted",
        },
        {
          at: "2026-11-30T10:01:00.000Z",
          fromState: "submitted",
          toState: "running",
          actor: "worker",
          actorName: null,
          message: "Started on the host",
        },
      ],
      timings: [{ stage: "inner", symmetry: "A'", durationSeconds: 41.5 }],
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
          actorName: "Tomás Brandt",
          message: "Submitted",
        },
        {
          at: "2026-11-29T18:00:00.000Z",
          fromState: "collecting",
          toState: "done",
          actor: "worker",
          actorName: null,
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
    {
      ...base,
      id: RUN_IDS.reused,
      name: "HNCO cross sections, reused",
      state: "done",
      stateMessage: `Results reused from run ${RUN_IDS.done}.`,
      chargedCoreHours: 0,
      reservedCoreHours: 0,
      reusedFrom: RUN_IDS.done,
      finishedAt: "2026-11-30T11:00:00.000Z",
      spec: { ...base.spec, name: "HNCO cross sections, reused" },
      events: [
        {
          at: "2026-11-30T11:00:00.000Z",
          fromState: null,
          toState: "done",
          actor: "user",
          actorName: "Tomás Brandt",
          message: `Reused the results of run ${RUN_IDS.done}`,
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
    {
      ...base,
      id: RUN_IDS.cancelled,
      name: "HNCO cc-pVTZ inner region",
      state: "cancelled",
      stateMessage: "Cancelled; the scheduler confirmed the job ended",
      cancelRequested: true,
      cancelRequestedByName: "Noor Vasquez",
      finishedAt: "2026-11-30T12:10:00.000Z",
      spec: { ...base.spec, name: "HNCO cc-pVTZ inner region" },
      events: [
        {
          at: "2026-11-30T12:00:00.000Z",
          fromState: null,
          toState: "queued",
          actor: "user",
          actorName: "Tomás Brandt",
          message: "Submitted",
        },
        {
          at: "2026-11-30T12:09:00.000Z",
          fromState: "running",
          toState: "collecting",
          actor: "worker",
          actorName: null,
          message: "The scheduler reports the job cancelled",
        },
        {
          at: "2026-11-30T12:10:00.000Z",
          fromState: "collecting",
          toState: "cancelled",
          actor: "user",
          actorName: "Noor Vasquez",
          message: "Cancelled; the scheduler confirmed the job ended",
        },
      ],
    },
  ];
}
