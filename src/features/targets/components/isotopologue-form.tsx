import type { TargetDetail } from "@shared/schemas";
import { hillFormula } from "@shared/science/geometry";
import { useMutation, useQueryClient } from "@tanstack/react-query";
import { type FormEvent, useState } from "react";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { Notice } from "@/components/ui/notice";
import { Select } from "@/components/ui/select";
import { describeError } from "@/lib/describe-error";
import { fieldErrorsFromError } from "@/lib/field-errors";
import { Formula, formulaText } from "@/lib/formula";
import { createIsotopologue } from "../api/target-commands";
import { targetQueries } from "../api/target-queries";
import { isotopeChoices } from "../lib/target-draft";

/**
 * The usual substitution preselected per element: deuterium for hydrogen (common practice in isotopologue
 * studies); other elements keep their isotope until one is picked.
 */
const USUAL_SUBSTITUTION: Record<string, number> = { H: 2 };

type IsotopologueFormProps = {
  target: TargetDetail;
  onCreated: (targetId: string) => void;
  onCancel: () => void;
};

/** A new isotopologue in two clicks: the form opens with H → D chosen and its name proposed; Create sends it. */
export function IsotopologueForm({ target, onCreated, onCancel }: IsotopologueFormProps) {
  const queryClient = useQueryClient();
  const resolved = target.current.derived.atoms;
  const [choices, setChoices] = useState<number[]>(() =>
    resolved.map((atom) => USUAL_SUBSTITUTION[atom.symbol] ?? atom.massNumber),
  );
  const formula = hillFormula(resolved.map((atom, i) => ({ symbol: atom.symbol, massNumber: choices[i]! })));
  const [name, setName] = useState<string | null>(null);
  const shownName = name ?? `${target.name} (${formulaText(formula)})`;
  const changed = resolved.flatMap((atom, i) =>
    choices[i] !== atom.massNumber ? [{ atom: i + 1, massNumber: choices[i]! }] : [],
  );
  const create = useMutation({
    mutationFn: () => createIsotopologue(target.id, { name: shownName, isotopes: changed }),
    onSuccess: (created) => {
      void queryClient.invalidateQueries({ queryKey: targetQueries.all });
      onCreated(created.id);
    },
  });
  const serverErrors = create.error ? fieldErrorsFromError(create.error) : {};
  const [tried, setTried] = useState(false);
  const nothingChanged = changed.length === 0 ? "Choose another isotope for at least one atom." : undefined;

  function onSubmit(event: FormEvent) {
    event.preventDefault();
    setTried(true);
    if (changed.length > 0 && shownName.trim()) create.mutate();
  }

  return (
    <form onSubmit={onSubmit} noValidate aria-label="New isotopologue" className="flex flex-col gap-4">
      <Field
        label="Name"
        error={serverErrors.name ?? (shownName.trim() ? undefined : "Give the isotopologue a name.")}
      >
        {(control) => <Input {...control} value={shownName} onChange={(e) => setName(e.target.value)} />}
      </Field>
      <fieldset className="flex flex-col gap-2">
        <legend className="mb-1 text-sm font-medium text-ink-800">
          Isotope of each atom (mass, natural abundance)
        </legend>
        <div className="grid gap-2 sm:grid-cols-2 lg:grid-cols-3">
          {resolved.map((atom, i) => (
            <div key={atom.index} className="flex items-center gap-2 text-sm">
              <span className="w-14 font-mono text-xs text-ink-600">
                {atom.index}. {atom.symbol}
              </span>
              <Select
                aria-label={`Atom ${atom.index} (${atom.symbol}) isotope`}
                controlSize="sm"
                value={String(choices[i])}
                onChange={(e) => setChoices((c) => c.map((v, j) => (j === i ? Number(e.target.value) : v)))}
                className="flex-1 font-mono text-xs"
              >
                {isotopeChoices(atom.symbol, choices[i]).map((choice) => (
                  <option key={choice.massNumber} value={choice.massNumber}>
                    {choice.massNumber}
                    {atom.symbol} — {choice.massU.toFixed(6)} u,{" "}
                    {choice.abundancePercent === null
                      ? "not natural"
                      : `${Number(choice.abundancePercent.toPrecision(4))} %`}
                  </option>
                ))}
              </Select>
            </div>
          ))}
        </div>
      </fieldset>
      <p className="text-sm text-ink-700">
        Formula: <Formula formula={formula} className="font-mono" />
      </p>
      {tried && nothingChanged ? (
        <p role="alert" className="text-sm font-medium text-ember-700">
          {nothingChanged}
        </p>
      ) : null}
      {create.error && !serverErrors.name ? (
        <Notice tone="error">{describeError(create.error).message}</Notice>
      ) : null}
      <div className="flex gap-2">
        <Button type="submit" pending={create.isPending}>
          Create isotopologue
        </Button>
        <Button variant="secondary" onClick={onCancel}>
          Cancel
        </Button>
      </div>
    </form>
  );
}
