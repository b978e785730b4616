import type { TargetDetail } from "@shared/schemas";
import { listBasisFamilies } from "@shared/science/basis-coverage";
import { useMutation, useQueryClient } from "@tanstack/react-query";
import { type DragEvent, type FormEvent, useDeferredValue, useMemo, useRef, useState } from "react";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Input, Textarea } from "@/components/ui/input";
import { Notice } from "@/components/ui/notice";
import { describeError } from "@/lib/describe-error";
import { fieldErrorsFromError } from "@/lib/field-errors";
import { createTarget, updateTarget, uploadTarget } from "../api/target-commands";
import { targetQueries } from "../api/target-queries";
import { deriveTarget } from "../lib/derive-target";
import { readXyzFile, readXyzText } from "../lib/read-xyz";
import {
  checkDraft,
  type DraftAtom,
  draftAtom,
  formatCoordinate,
  sameAtoms,
  type TargetDraft,
} from "../lib/target-draft";
import { AtomTable } from "./atom-table";
import { DerivedPanel } from "./derived-panel";
import { MoleculeView } from "./molecule-view";

const BASIS_NAMES = listBasisFamilies();
const DEFAULT_BASIS = BASIS_NAMES.includes("aug-cc-pVDZ") ? "aug-cc-pVDZ" : (BASIS_NAMES[0] ?? "");

/** The editor's starting point: an empty target, or a target's current version to save a new one. */
export function draftFromTarget(target?: TargetDetail): TargetDraft {
  if (!target) return { name: "", charge: "0", multiplicity: "", atoms: [] };
  const version = target.current;
  return {
    name: target.name,
    charge: String(version.charge),
    multiplicity: String(version.multiplicity),
    atoms: version.atoms.map((atom) =>
      draftAtom(atom.symbol, atom.massNumber, [atom.xAngstrom, atom.yAngstrom, atom.zAngstrom]),
    ),
  };
}

type TargetEditorProps = {
  groupId: string;
  /** Present: save a new version of this target; absent: enter a new target. */
  target?: TargetDetail;
  onSaved?: (targetId: string) => void;
};

/**
 * Enter or edit a target: paste or drop an XYZ file, or type atoms into the table; the panel beside it
 * derives point group, rotational constants and the rest in the browser on every change, and nothing is
 * sent until every field is valid.
 */
export function TargetEditor({ groupId, target, onSaved }: TargetEditorProps) {
  const queryClient = useQueryClient();
  const [draft, setDraft] = useState<TargetDraft>(() => draftFromTarget(target));
  const [submitted, setSubmitted] = useState(false);
  const [xyzText, setXyzText] = useState("");
  const [importMessage, setImportMessage] = useState<{ ok: boolean; text: string } | null>(null);
  const [basis, setBasis] = useState(DEFAULT_BASIS);
  const [diffuseExponent, setDiffuseExponent] = useState("0.03");
  const [dragging, setDragging] = useState(false);
  /** The XYZ file the atoms came from, with the rows it gave, while they are unchanged. */
  const [file, setFile] = useState<{ file: File; atoms: DraftAtom[] } | null>(null);
  const fileInput = useRef<HTMLInputElement>(null);

  const checked = useMemo(() => checkDraft(draft), [draft]);
  const atomErrors = Object.keys(checked.errors).some((key) => key.startsWith("atoms"));
  // While an atom field is wrong the panel keeps showing the last atoms that were all valid.
  const lastValid = useRef(checked.atoms);
  if (!atomErrors) lastValid.current = checked.atoms;
  const deferredAtoms = useDeferredValue(lastValid.current);
  const alpha = Number(diffuseExponent);
  const derived = useMemo(
    () =>
      deriveTarget(deferredAtoms, {
        charge: checked.charge ?? 0,
        multiplicity: checked.multiplicity ?? undefined,
        basis,
        diffuseExponentBohr2: Number.isFinite(alpha) && alpha > 0 ? alpha : 0,
      }),
    [deferredAtoms, checked.charge, checked.multiplicity, basis, alpha],
  );

  const save = useMutation({
    mutationFn: async (request: NonNullable<typeof checked.request>) => {
      if (target) {
        return (await updateTarget(target.id, { ...request, multiplicity: request.multiplicity ?? null })).id;
      }
      // A new target whose atoms are still those of the chosen file is entered from the file itself.
      if (file && sameAtoms(draft.atoms, file.atoms)) {
        const { name, charge, multiplicity } = request;
        return (await uploadTarget(groupId, file.file, { name, charge, multiplicity })).id;
      }
      return (await createTarget(groupId, request)).id;
    },
    onSuccess: (id) => {
      void queryClient.invalidateQueries({ queryKey: targetQueries.all });
      onSaved?.(id);
    },
  });

  const serverErrors = save.error ? fieldErrorsFromError(save.error) : {};
  const shown = (key: string) =>
    key.startsWith("atoms") || submitted || (key === "name" ? draft.name !== "" : true)
      ? (checked.errors[key] ?? serverErrors[key])
      : undefined;

  const setAtoms = (atoms: DraftAtom[]) => setDraft((d) => ({ ...d, atoms }));

  function take(result: ReturnType<typeof readXyzText>, source: string) {
    if (!result.ok) {
      setImportMessage({ ok: false, text: result.message });
      return;
    }
    setAtoms(result.atoms);
    setDraft((d) => ({ ...d, name: d.name || result.comment.slice(0, 120).trim() }));
    setImportMessage({ ok: true, text: `${result.atoms.length} atoms read from ${source}.` });
  }

  async function takeFile(chosen: File | undefined) {
    if (!chosen) return;
    const result = await readXyzFile(chosen);
    take(result, chosen.name);
    setFile(result.ok ? { file: chosen, atoms: result.atoms } : null);
  }

  function onDrop(event: DragEvent<HTMLDivElement>) {
    event.preventDefault();
    setDragging(false);
    void takeFile(event.dataTransfer.files[0]);
  }

  function recentre() {
    const com = derived.inspection?.centreOfMassAngstrom;
    if (!com) return;
    setAtoms(
      draft.atoms.map((atom) => ({
        ...atom,
        x: formatCoordinate(Number(atom.x) - com[0]),
        y: formatCoordinate(Number(atom.y) - com[1]),
        z: formatCoordinate(Number(atom.z) - com[2]),
      })),
    );
  }

  function onSubmit(event: FormEvent) {
    event.preventDefault();
    setSubmitted(true);
    if (checked.request) save.mutate(checked.request);
  }

  return (
    // biome-ignore lint/a11y/noStaticElementInteractions: dropping a file is a shortcut; the file picker is the keyboard way.
    <div
      onDragOver={(event) => {
        event.preventDefault();
        setDragging(true);
      }}
      onDragLeave={() => setDragging(false)}
      onDrop={onDrop}
      className={dragging ? "rounded-xl outline-2 outline-flux-500 outline-dashed" : undefined}
    >
      <form
        onSubmit={onSubmit}
        noValidate
        aria-label={target ? `Edit ${target.name}` : "New target"}
        // The derived panel follows the atoms at the page's full width: beside them it would squeeze the
        // coordinates and the isotope picker.
        className="flex flex-col gap-8"
      >
        <div className="flex flex-col gap-4">
          <div className="grid gap-4 sm:grid-cols-[minmax(0,1fr)_7rem_9rem]">
            <Field label="Name" error={shown("name")}>
              {(control) => (
                <Input
                  {...control}
                  value={draft.name}
                  onChange={(e) => setDraft((d) => ({ ...d, name: e.target.value }))}
                  autoComplete="off"
                />
              )}
            </Field>
            <Field label="Charge (e)" error={shown("charge")}>
              {(control) => (
                <Input
                  {...control}
                  value={draft.charge}
                  inputMode="numeric"
                  onChange={(e) => setDraft((d) => ({ ...d, charge: e.target.value }))}
                />
              )}
            </Field>
            <Field label="Multiplicity (2S+1)" error={shown("multiplicity")} hint="Empty: the lowest">
              {(control) => (
                <Input
                  {...control}
                  value={draft.multiplicity}
                  inputMode="numeric"
                  onChange={(e) => setDraft((d) => ({ ...d, multiplicity: e.target.value }))}
                />
              )}
            </Field>
          </div>

          <div className="rounded-lg border border-dashed border-ink-200 p-3">
            <p className="text-sm text-ink-700">
              Drop an XYZ file anywhere here, or{" "}
              <Button variant="secondary" size="sm" onClick={() => fileInput.current?.click()}>
                choose a file
              </Button>
              , or paste its text:
            </p>
            <input
              ref={fileInput}
              type="file"
              accept=".xyz,text/plain,chemical/x-xyz"
              aria-label="XYZ file"
              className="sr-only"
              onChange={(event) => {
                void takeFile(event.target.files?.[0]);
                event.target.value = "";
              }}
            />
            <div className="mt-2 flex items-start gap-2">
              <Textarea
                aria-label="XYZ text"
                value={xyzText}
                onChange={(e) => setXyzText(e.target.value)}
                rows={3}
                spellCheck={false}
                className="font-mono text-xs"
                placeholder={"3\nwater\nO 0 0 0.1173\nH 0 0.7572 -0.4692\nH 0 -0.7572 -0.4692"}
              />
              <Button
                variant="secondary"
                size="sm"
                onClick={() => {
                  setFile(null);
                  take(readXyzText(xyzText), "the pasted text");
                }}
              >
                Read into the table
              </Button>
            </div>
            {importMessage ? (
              <p
                role={importMessage.ok ? "status" : "alert"}
                className={`mt-2 text-sm ${importMessage.ok ? "text-ink-700" : "font-medium text-ember-700"}`}
              >
                {importMessage.text}
              </p>
            ) : null}
          </div>

          <AtomTable atoms={draft.atoms} errors={checked.errors} onChange={setAtoms} />

          {save.error && Object.keys(serverErrors).length === 0 ? (
            <Notice tone="error">{describeError(save.error).message}</Notice>
          ) : null}
          {submitted && !checked.request ? (
            <p role="alert" className="text-sm font-medium text-ember-700">
              Nothing was saved: fix the marked fields first.
            </p>
          ) : null}
          <div>
            <Button type="submit" pending={save.isPending}>
              {target ? "Save as a new version" : "Save target"}
            </Button>
          </div>
        </div>
        <DerivedPanel
          derived={derived}
          stale={atomErrors}
          basis={basis}
          basisNames={BASIS_NAMES}
          onBasisChange={setBasis}
          diffuseExponent={diffuseExponent}
          onDiffuseExponentChange={setDiffuseExponent}
          onRecentre={recentre}
        />
      </form>
      {derived.inspection ? (
        <div className="mt-6">
          <MoleculeView inspection={derived.inspection} />
        </div>
      ) : null}
    </div>
  );
}
