import type { CodeDefinition } from "@shared/schemas";
import { Fragment } from "react";
import { stageLinks } from "../lib/stage-flow";

export type ChainStage = { id: string; name: string; codeLabel: string; definition: CodeDefinition | null };

/**
 * A recipe's stages left to right, and between each pair the files the first stage's code declares as
 * collected files, which a run copies into the next stage's folder: marked when the next code names
 * them, when they replace one of its input files, and when Sigmaflow reads them for results.
 */
export function StageChain({ stages, label }: { stages: ChainStage[]; label: string }) {
  const links = stageLinks(stages.map((stage) => stage.definition));
  const legend = links.some((link) => link.files.length > 0);
  return (
    <div className="flex flex-col gap-1.5">
      <ol aria-label={label} className="flex flex-wrap items-stretch gap-y-3">
        {stages.map((stage, index) => {
          const link = links[index];
          return (
            <Fragment key={stage.id}>
              <li className="flex min-w-36 flex-col rounded-lg border border-ink-200 bg-white px-3 py-2">
                <span className="text-[11px] font-medium tracking-wide text-ink-500 uppercase">
                  Stage {index + 1}
                </span>
                <span className="font-medium text-ink-900">{stage.name || "(unnamed)"}</span>
                <span className="font-mono text-xs text-ink-600">{stage.codeLabel}</span>
                {stage.definition === null ? (
                  <span className="text-xs text-ember-700">code not found in this group</span>
                ) : null}
              </li>
              {link ? (
                <li
                  aria-label={`From stage ${index + 1} to stage ${index + 2}`}
                  className="flex min-w-28 flex-col items-center justify-center px-2 text-center"
                >
                  {link.files.length === 0 ? (
                    <span className="text-xs text-ink-400">no files</span>
                  ) : (
                    <ul className="flex flex-col gap-0.5">
                      {link.files.map((file) => (
                        <li key={file.fileName} className="font-mono text-[11px] text-ink-800">
                          {file.fileName}
                          {file.namedByNext ? (
                            <span
                              className="ml-1 font-sans text-flux-800"
                              title="The next code names this file"
                            >
                              read
                            </span>
                          ) : null}
                          {file.replacesInput ? (
                            <span className="ml-1 font-sans text-ember-700">replaces an input file</span>
                          ) : null}
                          {file.reader ? (
                            <span className="ml-1 font-sans text-ink-500">results: {file.reader}</span>
                          ) : null}
                        </li>
                      ))}
                    </ul>
                  )}
                  <span aria-hidden="true" className="mt-0.5 text-lg leading-none text-ink-400">
                    →
                  </span>
                </li>
              ) : null}
            </Fragment>
          );
        })}
      </ol>
      {legend ? (
        <p className="text-[11px] text-ink-500">
          Files between stages are the first stage's collected files, copied into the next stage's folder.{" "}
          <span className="text-flux-800">read</span>: the next code names the file in its templates,
          arguments or standard input.
        </p>
      ) : null}
    </div>
  );
}
