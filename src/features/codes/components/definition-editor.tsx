import { type Code, type CodeDefinition, codeDefinitionSchema } from "@shared/schemas";
import { useMutation, useQueryClient } from "@tanstack/react-query";
import { useId, useRef, useState } from "react";
import { Button } from "@/components/ui/button";
import { Card, CardBody, CardHeader } from "@/components/ui/card";
import { controlClasses } from "@/components/ui/input";
import { Notice } from "@/components/ui/notice";
import { isApiRequestError } from "@/lib/api-error";
import { cn } from "@/lib/cn";
import { registerCode } from "../api/code-commands";
import { codeQueries } from "../api/code-queries";
import { type ImportProblem, readDefinitionText } from "../lib/export-file";
import { lineOfPath, lineRange } from "../lib/json-paths";

const problemSchema = (details: unknown): ImportProblem[] =>
  Array.isArray(details)
    ? details.flatMap((item) =>
        item && typeof item === "object" && typeof item.path === "string" && typeof item.message === "string"
          ? [{ path: item.path, message: item.message }]
          : [],
      )
    : [];

/** A starting point for a new code: one input file rendered from one parameter with a unit. */
export const BLANK_DEFINITION: CodeDefinition = {
  name: "new-code",
  version: "1.0",
  description: "",
  executable: "/opt/codes/bin/solver",
  arguments: [],
  setupLines: [],
  inputTemplates: [{ fileName: "input.txt", format: "text", template: "energy {{ energyEv }}\n" }],
  parameters: {
    type: "object",
    properties: {
      energyEv: { type: "number", minimum: 0, default: 1, unit: "eV", description: "Collision energy" },
    },
    additionalProperties: false,
  },
  outputFiles: [],
  outputRules: { progress: [], timings: [] },
  resultFiles: [],
  defaults: { cores: 1, wallTimeMinutes: 60 },
};

/** The next version label: the last number in it raised by one ("2.1" → "2.2"), else "-2" appended. */
export function nextVersion(version: string): string {
  const match = /^(.*?)(\d+)([^\d]*)$/.exec(version);
  if (!match) return `${version}-2`;
  return `${match[1]}${Number(match[2]) + 1}${match[3]}`;
}

type Props = {
  groupId: string;
  /** The version a new one starts from; none for a new code. */
  basedOn: Code | null;
  onRegistered: (code: Code) => void;
  onCancel: () => void;
};

/**
 * A definition as JSON: checked against the contract here, then by the server (schema, templates,
 * patterns, file names). Each problem is listed at the path it concerns, with the line it is on.
 */
export function DefinitionEditor({ groupId, basedOn, onRegistered, onCancel }: Props) {
  const queryClient = useQueryClient();
  const textareaId = useId();
  const problemsId = useId();
  const textareaRef = useRef<HTMLTextAreaElement>(null);
  const initial = basedOn
    ? { ...basedOn.definition, version: nextVersion(basedOn.definition.version) }
    : BLANK_DEFINITION;
  const [text, setText] = useState(() => JSON.stringify(initial, null, 2));
  const [problems, setProblems] = useState<ImportProblem[]>([]);
  const [summary, setSummary] = useState<string | null>(null);

  const register = useMutation({
    mutationFn: (definition: CodeDefinition) => registerCode(groupId, definition),
    onSuccess: async (code) => {
      await queryClient.invalidateQueries({ queryKey: codeQueries.all });
      onRegistered(code);
    },
    onError: (error) => {
      const details = isApiRequestError(error) ? problemSchema(error.details) : [];
      setSummary(
        details.length > 0
          ? `Nothing was registered: the server found ${details.length === 1 ? "a problem" : `${details.length} problems`}.`
          : error.message,
      );
      setProblems(details);
    },
  });

  const submit = () => {
    setSummary(null);
    const read = readDefinitionText(text, codeDefinitionSchema);
    if (!read.ok) {
      setSummary("The definition does not fit the contract; nothing was sent.");
      setProblems(read.problems);
      return;
    }
    setProblems([]);
    register.mutate(read.definition);
  };

  const showLine = (line: number) => {
    const area = textareaRef.current;
    if (!area) return;
    const { start, end } = lineRange(text, line);
    area.focus();
    area.setSelectionRange(start, end);
    const lineHeight = area.scrollHeight / Math.max(text.split("\n").length, 1);
    area.scrollTop = Math.max(0, (line - 4) * lineHeight);
  };

  const title = basedOn
    ? `New version of ${basedOn.definition.name} (from ${basedOn.definition.version})`
    : "Register a code";
  return (
    <Card>
      <CardHeader
        title={title}
        description={
          basedOn
            ? "Registered versions never change: this registers a separate version next to the old one, which earlier runs and recipes keep using."
            : "The definition as JSON: the binary, its input templates (nunjucks), the JSON Schema of its parameters and the files it writes."
        }
      />
      <CardBody className="flex flex-col gap-3">
        <label htmlFor={textareaId} className="text-sm font-medium text-ink-800">
          Definition (JSON)
        </label>
        <textarea
          id={textareaId}
          ref={textareaRef}
          value={text}
          onChange={(event) => setText(event.target.value)}
          spellCheck={false}
          rows={22}
          aria-invalid={problems.length > 0 ? true : undefined}
          aria-describedby={problems.length > 0 || summary ? problemsId : undefined}
          className={cn(controlClasses, "min-h-24 py-2 font-mono text-xs leading-5")}
        />
        {summary || problems.length > 0 ? (
          <div
            id={problemsId}
            role="alert"
            className="rounded-lg border border-ember-100 bg-ember-50 px-4 py-3"
          >
            {summary ? <p className="text-sm font-medium text-ember-700">{summary}</p> : null}
            {problems.length > 0 ? (
              <ul className="mt-2 flex flex-col gap-1.5" aria-label="Problems by path">
                {problems.map((problem) => {
                  const line = lineOfPath(text, problem.path);
                  return (
                    <li key={`${problem.path}\0${problem.message}`} className="text-sm text-ember-700">
                      <code className="rounded bg-white px-1.5 py-0.5 font-mono text-xs text-ink-900">
                        {problem.path || "(whole definition)"}
                      </code>{" "}
                      {problem.message}
                      {line !== null ? (
                        <button
                          type="button"
                          className="ml-2 text-xs text-flux-800 underline underline-offset-2"
                          onClick={() => showLine(line)}
                        >
                          line {line}
                        </button>
                      ) : null}
                    </li>
                  );
                })}
              </ul>
            ) : null}
          </div>
        ) : null}
        <div className="flex gap-2">
          <Button onClick={submit} pending={register.isPending}>
            {basedOn ? "Register this version" : "Register code"}
          </Button>
          <Button
            variant="secondary"
            onClick={() => {
              try {
                setText(JSON.stringify(JSON.parse(text), null, 2));
              } catch (error) {
                setSummary(`Not JSON: ${(error as Error).message}`);
              }
            }}
          >
            Format JSON
          </Button>
          <Button variant="ghost" onClick={onCancel} disabled={register.isPending}>
            Cancel
          </Button>
        </div>
        {register.isSuccess ? <Notice tone="success">Registered.</Notice> : null}
      </CardBody>
    </Card>
  );
}
