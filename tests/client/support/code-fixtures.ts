/**
 * Codes and hosts as the fake API serves them: a code definition with empty templates, rules and files
 * unless overridden, and a confirmed host of the Kestrel group.
 */
import type { CodeDefinition, Host } from "@shared/schemas";
import { KESTREL_ID } from "./fixtures";

const CREATED = "2026-11-01T09:00:00.000Z";

export function codeDefinition(
  overrides: Partial<CodeDefinition> & Pick<CodeDefinition, "name">,
): CodeDefinition {
  return {
    version: "1.0",
    description: "",
    executable: `/opt/codes/bin/${overrides.name}`,
    arguments: [],
    setupLines: [],
    inputTemplates: [],
    parameters: { type: "object", properties: {} },
    outputFiles: [],
    outputRules: { progress: [], timings: [] },
    resultFiles: [],
    defaults: { cores: 4, wallTimeMinutes: 30 },
    ...overrides,
  };
}

export function hostFixture(
  id: string,
  name: string,
  scheduler: Host["scheduler"] = "slurm",
  overrides: Partial<Host> = {},
): Host {
  return {
    id,
    groupId: KESTREL_ID,
    name,
    address: `${name}.example`,
    port: 22,
    scheduler,
    remoteBaseDir: "/scratch/sigmaflow",
    maxConcurrentRuns: 4,
    hostKeyFingerprint: "SHA256:abc",
    hostKeyConfirmed: true,
    status: "ok",
    statusMessage: null,
    createdAt: CREATED,
    ...overrides,
  };
}
