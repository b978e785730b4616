import type { Code, CodeExport } from "@shared/schemas";
import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { useId, useRef, useState } from "react";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";
import { isApiRequestError } from "@/lib/api-error";
import { exportCodes, importCodes } from "../api/code-commands";
import { codeQueries } from "../api/code-queries";
import { downloadJson, type ImportProblem, readImportFile } from "../lib/export-file";
import { CodeDetail } from "./code-detail";
import { CodesTable } from "./codes-table";
import { DefinitionEditor } from "./definition-editor";
import { RecipesPanel } from "./recipes-panel";

type Editing = { basedOn: Code | null } | null;

function problemsOf(error: unknown): ImportProblem[] {
  if (!isApiRequestError(error) || !Array.isArray(error.details)) return [];
  return error.details.filter(
    (d): d is ImportProblem => d && typeof d.path === "string" && typeof d.message === "string",
  );
}

/** Import and export of the group's definitions as one JSON file. */
function ImportExport({ groupId, canWrite }: { groupId: string; canWrite: boolean }) {
  const queryClient = useQueryClient();
  const inputId = useId();
  const inputRef = useRef<HTMLInputElement>(null);
  const [problems, setProblems] = useState<ImportProblem[] | null>(null);
  const [fileName, setFileName] = useState("");
  const doImport = useMutation({
    mutationFn: (document: CodeExport) => importCodes(groupId, document),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: codeQueries.all }),
  });
  const doExport = useMutation({
    mutationFn: () => exportCodes(groupId),
    onSuccess: (document) => downloadJson("sigmaflow-codes.json", document),
  });

  const onFile = async (file: File | undefined) => {
    if (!file) return;
    setFileName(file.name);
    doImport.reset();
    const read = await readImportFile(file);
    if (inputRef.current) inputRef.current.value = "";
    if (!read.ok) {
      setProblems(read.problems);
      return;
    }
    setProblems(null);
    doImport.mutate(read.document);
  };

  const serverProblems = problemsOf(doImport.error);
  const shown = problems ?? serverProblems;
  return (
    <div className="flex flex-col items-end gap-2">
      <div className="flex gap-2">
        <Button variant="secondary" size="sm" pending={doExport.isPending} onClick={() => doExport.mutate()}>
          Export all
        </Button>
        {canWrite ? (
          <>
            <input
              id={inputId}
              ref={inputRef}
              type="file"
              accept="application/json,.json"
              className="sr-only"
              onChange={(event) => void onFile(event.target.files?.[0])}
            />
            <label
              htmlFor={inputId}
              className="inline-flex h-8 cursor-pointer items-center rounded-lg border border-ink-200 bg-white px-3 text-sm font-medium text-ink-800 shadow-sm hover:bg-ink-50 focus-within:outline-2"
            >
              Import file…
            </label>
          </>
        ) : null}
      </div>
      {doExport.isError ? <Notice tone="error">{doExport.error.message}</Notice> : null}
      {doImport.isSuccess ? (
        <Notice tone="success">
          Imported {doImport.data.codes.length}{" "}
          {doImport.data.codes.length === 1 ? "definition" : "definitions"} from {fileName}:{" "}
          {doImport.data.codes.map((c) => `${c.definition.name} ${c.definition.version}`).join(", ")}.
        </Notice>
      ) : null}
      {problems || doImport.isError ? (
        <Notice tone="error" title={`Nothing was imported from ${fileName}`}>
          {problems ? null : <p>{doImport.error?.message}</p>}
          {shown.length > 0 ? (
            <ul aria-label="Import problems by path" className="mt-1 list-disc pl-4">
              {shown.slice(0, 20).map((problem) => (
                <li key={`${problem.path}\0${problem.message}`}>
                  <code className="font-mono text-xs">{problem.path || "(file)"}</code> {problem.message}
                </li>
              ))}
            </ul>
          ) : null}
        </Notice>
      ) : null}
    </div>
  );
}

/**
 * The Codes page: the group's codes by version with one open in detail (parameters, output rules,
 * template preview), registering and importing definitions, and the group's recipes.
 */
export function CodesWorkspace({
  groupId,
  groupName,
  canWrite,
}: {
  groupId: string;
  groupName: string;
  canWrite: boolean;
}) {
  const codes = useQuery(codeQueries.list(groupId));
  const [selectedId, setSelectedId] = useState<string | null>(null);
  const [editing, setEditing] = useState<Editing>(null);
  const list = codes.data?.codes ?? [];
  const selected = list.find((code) => code.id === selectedId) ?? null;
  const versions = selected
    ? list.filter((code) => code.definition.name === selected.definition.name).reverse()
    : [];

  return (
    <div className="flex flex-col gap-6">
      <div className="flex flex-wrap items-start justify-between gap-3">
        {canWrite ? (
          <Button size="sm" onClick={() => setEditing({ basedOn: null })} disabled={editing !== null}>
            Register a code
          </Button>
        ) : (
          <p className="text-sm text-ink-500">Collaborators can read codes and preview their files.</p>
        )}
        <ImportExport groupId={groupId} canWrite={canWrite} />
      </div>
      {editing ? (
        <DefinitionEditor
          key={editing.basedOn?.id ?? "new"}
          groupId={groupId}
          basedOn={editing.basedOn}
          onCancel={() => setEditing(null)}
          onRegistered={(code) => {
            setEditing(null);
            setSelectedId(code.id);
          }}
        />
      ) : null}
      <CodesTable groupId={groupId} groupName={groupName} selectedId={selectedId} onSelect={setSelectedId} />
      {selected ? (
        <CodeDetail
          groupId={groupId}
          code={selected}
          versions={versions}
          canWrite={canWrite}
          onSelect={setSelectedId}
          onNewVersion={(code) => setEditing({ basedOn: code })}
          onDeleted={() => setSelectedId(null)}
        />
      ) : null}
      <RecipesPanel groupId={groupId} canWrite={canWrite} />
    </div>
  );
}
