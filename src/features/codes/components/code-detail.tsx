import type { Code } from "@shared/schemas";
import { useMutation, useQueryClient } from "@tanstack/react-query";
import { useState } from "react";
import { Badge } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";
import { Card, CardBody, CardHeader } from "@/components/ui/card";
import { ConfirmDialog } from "@/components/ui/dialog";
import { Table, TBody, TD, TH, THead, TR } from "@/components/ui/table";
import { formatDate } from "@/lib/format";
import { deleteCode, setCodeRetired } from "../api/code-commands";
import { codeQueries, recipeQueries } from "../api/code-queries";
import { downloadJson, exportDocument } from "../lib/export-file";
import { parameterRows, printBounds, printValue } from "../lib/parameter-rows";
import { CodeHostsSection } from "./code-hosts-section";
import { CodePreview } from "./code-preview";

function List({ items, empty = "none" }: { items: string[]; empty?: string }) {
  if (items.length === 0) return <span className="text-ink-400">{empty}</span>;
  return (
    <span className="font-mono text-xs">
      {items.map((item, i) => (
        <span key={item}>
          {i > 0 ? ", " : ""}
          {item}
        </span>
      ))}
    </span>
  );
}

function Rules({ label, patterns }: { label: string; patterns: string[] }) {
  return (
    <div>
      <dt className="text-xs font-medium text-ink-500">{label}</dt>
      <dd className="mt-1">
        {patterns.length === 0 ? (
          <span className="text-sm text-ink-400">none</span>
        ) : (
          <ul className="flex flex-col gap-1">
            {patterns.map((pattern) => (
              <li key={pattern}>
                <code className="rounded bg-ink-50 px-1.5 py-0.5 font-mono text-xs text-ink-900">
                  {pattern}
                </code>
              </li>
            ))}
          </ul>
        )}
      </dd>
    </div>
  );
}

type Props = {
  groupId: string;
  code: Code;
  /** Other versions of the same name, newest first. */
  versions: Code[];
  canWrite: boolean;
  onSelect: (codeId: string) => void;
  onNewVersion: (code: Code) => void;
  onDeleted: () => void;
};

/** One version of a code: what it runs, its parameters and output rules, and a preview of its files. */
export function CodeDetail({ groupId, code, versions, canWrite, onSelect, onNewVersion, onDeleted }: Props) {
  const queryClient = useQueryClient();
  const [confirming, setConfirming] = useState(false);
  const { definition } = code;
  const rows = parameterRows(definition.parameters);
  const [confirmingRetire, setConfirmingRetire] = useState(false);
  const retirement = useMutation({
    mutationFn: (retired: boolean) => setCodeRetired(code.id, retired),
    onSuccess: async () => {
      setConfirmingRetire(false);
      await queryClient.invalidateQueries({ queryKey: codeQueries.all });
    },
  });
  const remove = useMutation({
    mutationFn: () => deleteCode(code.id),
    onSuccess: async () => {
      setConfirming(false);
      await queryClient.invalidateQueries({ queryKey: codeQueries.all });
      await queryClient.invalidateQueries({ queryKey: recipeQueries.all });
      onDeleted();
    },
  });

  return (
    <Card>
      <CardHeader
        title={`${definition.name} ${definition.version}`}
        description={definition.description || undefined}
        actions={
          <>
            <Button
              size="sm"
              variant="secondary"
              onClick={() =>
                downloadJson(
                  `${definition.name}-${definition.version}.sigmaflow-code.json`,
                  exportDocument([definition]),
                )
              }
            >
              Export
            </Button>
            {canWrite ? (
              <>
                <Button size="sm" variant="secondary" onClick={() => onNewVersion(code)}>
                  New version
                </Button>
                {code.retiredAt ? (
                  <Button
                    size="sm"
                    variant="secondary"
                    disabled={retirement.isPending}
                    onClick={() => retirement.mutate(false)}
                  >
                    Bring back
                  </Button>
                ) : (
                  <Button size="sm" variant="secondary" onClick={() => setConfirmingRetire(true)}>
                    Retire version
                  </Button>
                )}
                <Button size="sm" variant="ghost-danger" onClick={() => setConfirming(true)}>
                  Delete version
                </Button>
              </>
            ) : null}
          </>
        }
      />
      <CardBody className="flex flex-col gap-6">
        {code.retiredAt ? (
          <p className="rounded-md bg-ink-50 px-3 py-2 text-sm text-ink-700" role="status">
            <Badge tone="muted">retired</Badge>{" "}
            {`Retired ${formatDate(code.retiredAt)}: new recipes and runs cannot use this version; its existing recipes and runs are kept.`}
          </p>
        ) : null}
        {!confirmingRetire && retirement.error ? (
          <p className="text-sm text-ember-700" role="alert">
            {retirement.error.message}
          </p>
        ) : null}
        <dl className="grid gap-4 text-sm sm:grid-cols-2 lg:grid-cols-4">
          <div>
            <dt className="text-xs font-medium text-ink-500">Executable</dt>
            <dd className="mt-1 font-mono text-xs break-all">{definition.executable}</dd>
          </div>
          <div>
            <dt className="text-xs font-medium text-ink-500">Defaults</dt>
            <dd className="mt-1 font-mono text-xs">
              {definition.defaults.cores} cores × {definition.defaults.wallTimeMinutes} min wall time
            </dd>
          </div>
          <div>
            <dt className="text-xs font-medium text-ink-500">Registered</dt>
            <dd className="mt-1 text-xs">{formatDate(code.createdAt)}</dd>
          </div>
          <div>
            <dt className="text-xs font-medium text-ink-500">Versions of {definition.name}</dt>
            <dd className="mt-1 flex flex-wrap gap-1">
              {versions.map((version) =>
                version.id === code.id ? (
                  <Badge key={version.id} tone="ink">
                    {version.definition.version}
                  </Badge>
                ) : (
                  <button
                    key={version.id}
                    type="button"
                    className="rounded-md px-1.5 font-mono text-xs text-flux-800 underline underline-offset-2"
                    onClick={() => onSelect(version.id)}
                  >
                    {version.definition.version}
                  </button>
                ),
              )}
            </dd>
          </div>
          <div>
            <dt className="text-xs font-medium text-ink-500">Input files</dt>
            <dd className="mt-1">
              <List items={definition.inputTemplates.map((t) => `${t.fileName} (${t.format})`)} />
            </dd>
          </div>
          <div>
            <dt className="text-xs font-medium text-ink-500">Standard input</dt>
            <dd className="mt-1">
              <List items={definition.stdinFile ? [definition.stdinFile] : []} />
            </dd>
          </div>
          <div>
            <dt className="text-xs font-medium text-ink-500">Collected files (handed to the next stage)</dt>
            <dd className="mt-1">
              <List items={definition.outputFiles} />
            </dd>
          </div>
          <div>
            <dt className="text-xs font-medium text-ink-500">Read for results</dt>
            <dd className="mt-1">
              <List items={definition.resultFiles.map((r) => `${r.fileName} (${r.reader})`)} />
            </dd>
          </div>
        </dl>

        <CodeHostsSection key={code.id} groupId={groupId} code={code} canWrite={canWrite} />

        <Table caption={`Parameters of ${definition.name} ${definition.version}`}>
          <THead>
            <TR>
              <TH>Parameter</TH>
              <TH>Type</TH>
              <TH>Default</TH>
              <TH>Unit</TH>
              <TH>Allowed</TH>
              <TH>Description</TH>
            </TR>
          </THead>
          <TBody>
            {rows.length === 0 ? (
              <TR>
                <TD colSpan={6} className="text-ink-500">
                  This code takes no parameters.
                </TD>
              </TR>
            ) : (
              rows.map((row) => (
                <TR key={row.name}>
                  <TD className="font-mono text-xs">
                    {row.name}
                    {row.required ? <span className="ml-1 text-ember-700">required</span> : null}
                  </TD>
                  <TD className="font-mono text-xs">{row.type}</TD>
                  <TD className="font-mono text-xs">{row.hasDefault ? printValue(row.default) : "—"}</TD>
                  <TD className="text-xs">{row.unit ?? "—"}</TD>
                  <TD className="font-mono text-xs">
                    {row.allowed
                      ? row.allowed.map(printValue).join(" | ")
                      : (printBounds(definition.parameters, row.name) ?? "—")}
                  </TD>
                  <TD className="text-xs">{row.description ?? "—"}</TD>
                </TR>
              ))
            )}
          </TBody>
        </Table>

        <div>
          <h3 className="text-sm font-semibold text-ink-900">Output rules</h3>
          <p className="mt-1 text-xs text-ink-500">
            Patterns (RE2 syntax) matched against each line of the run's log.
          </p>
          <dl className="mt-3 grid gap-4 sm:grid-cols-2">
            <Rules
              label="Progress (groups done and total, or percent)"
              patterns={definition.outputRules.progress}
            />
            <Rules label="Timings (groups symmetry and seconds)" patterns={definition.outputRules.timings} />
          </dl>
        </div>

        <CodePreview key={code.id} groupId={groupId} code={code} />
      </CardBody>
      <ConfirmDialog
        open={confirmingRetire}
        title={`Retire ${definition.name} ${definition.version}?`}
        confirmLabel="Retire version"
        tone="primary"
        pending={retirement.isPending}
        error={retirement.error}
        onConfirm={() => retirement.mutate(true)}
        onClose={() => {
          setConfirmingRetire(false);
          retirement.reset();
        }}
      >
        New recipes and runs cannot use a retired version; recipes and runs that already use it are kept. You
        can bring it back at any time.
      </ConfirmDialog>
      <ConfirmDialog
        open={confirming}
        title={`Delete ${definition.name} ${definition.version}?`}
        confirmLabel="Delete version"
        pending={remove.isPending}
        error={remove.error}
        onConfirm={() => remove.mutate()}
        onClose={() => {
          setConfirming(false);
          remove.reset();
        }}
      >
        Only this version is deleted; other versions stay. A version that recipes use cannot be deleted.
      </ConfirmDialog>
    </Card>
  );
}
