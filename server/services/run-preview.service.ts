/**
 * The preview of a run: the checks and rendering of a submission (prepareRun, the same code path), the
 * allocation's balance before and after the reservation it would make, and the finished run whose
 * results it could reuse. It only reads: no run, reservation, queue item or audit entry is written.
 */
import { coreHoursFromSeconds, coreSecondsFromHours } from "../../shared/core-hours";
import {
  RUN_PREVIEW_FILE_CHARS,
  type RunPreview,
  type RunPreviewFile,
} from "../../shared/schemas/run-preview";
import type { RunSpecRequest } from "../../shared/schemas/runs";
import type { Principal } from "../auth/principal";
import type { Database } from "../db/client";
import { JOB_SCRIPT, type PlanFile } from "../execution/run-plan";
import { activeAllocation, listAllocations } from "./allocations.service";
import { prepareRun } from "./run-create.service";

function previewFile(file: PlanFile): RunPreviewFile {
  const bytes = Buffer.from(file.contentBase64, "base64");
  // Decode at most a bounded prefix: 4 bytes per character is the most UTF-8 needs.
  const text = bytes.subarray(0, RUN_PREVIEW_FILE_CHARS * 4).toString("utf8");
  const truncated = text.length > RUN_PREVIEW_FILE_CHARS || bytes.length > RUN_PREVIEW_FILE_CHARS * 4;
  return {
    relativePath: file.relativePath,
    sizeBytes: bytes.length,
    sha256: file.sha256,
    text: text.slice(0, RUN_PREVIEW_FILE_CHARS),
    truncated,
  };
}

export async function previewRun(
  db: Database,
  principal: Principal,
  groupId: string,
  request: RunSpecRequest,
): Promise<RunPreview> {
  // Same checks, same order, same errors as createRun up to its transaction.
  const { inputs, spec, plan, fingerprint, reusable } = await prepareRun(db, principal, groupId, request);
  const reserveCoreSeconds = spec.resources.cores * spec.resources.wallTimeMinutes * 60;
  const costCoreHours = coreHoursFromSeconds(reserveCoreSeconds);

  const active = await activeAllocation(db, groupId, new Date());
  const balance = active
    ? (await listAllocations(db, principal, groupId)).find((allocation) => allocation.id === active.id)
    : undefined;
  let refusal: RunPreview["refusal"] = null;
  if (!active || !balance) {
    refusal = {
      code: "no_allocation",
      message: "Your group has no allocation for the current period: ask a group admin.",
    };
  } else if (balance.availableCoreHours < costCoreHours) {
    refusal = {
      code: "allocation_exceeded",
      message: `This run needs ${costCoreHours} core-hours (cores × wall-time limit) but ${balance.name} has ${Math.max(balance.availableCoreHours, 0)} left.`,
    };
  }

  const script = plan.files.find((file) => file.relativePath === JOB_SCRIPT);
  if (!script) throw new Error("The run plan has no batch script.");
  return {
    resources: spec.resources,
    costCoreHours,
    allocation: balance
      ? {
          id: balance.id,
          name: balance.name,
          availableCoreHoursBefore: balance.availableCoreHours,
          availableCoreHoursAfter: coreHoursFromSeconds(
            coreSecondsFromHours(balance.availableCoreHours) - reserveCoreSeconds,
          ),
        }
      : null,
    refusal,
    fingerprint,
    stages: plan.stages.map((stage, i) => ({
      index: stage.index,
      name: stage.name,
      codeName: stage.codeName,
      codeVersion: stage.codeVersion,
      parameters: inputs[i]?.parameters ?? {},
      files: plan.files
        .filter(
          (file) =>
            file.relativePath.startsWith(`${stage.dir}/`) &&
            !stage.extraFiles?.includes(file.relativePath.slice(stage.dir.length + 1)),
        )
        .map(previewFile),
      // Extra files by size and sha256 only: their bytes are the submitter's own, sent with the spec.
      extraFiles: (stage.extraFiles ?? []).map((fileName) => {
        const file = plan.files.find((f) => f.relativePath === `${stage.dir}/${fileName}`)!;
        return {
          fileName,
          sizeBytes: Buffer.from(file.contentBase64, "base64").length,
          sha256: file.sha256,
        };
      }),
    })),
    script: previewFile(script),
    reusable: reusable
      ? {
          id: reusable.id,
          name: reusable.name,
          finishedAt: reusable.finishedAt?.toISOString() ?? null,
          resultsState: reusable.resultsState,
        }
      : null,
  };
}
