import { getElement, isElementSymbol } from "@shared/science/elements";
import { Plus, Trash2 } from "lucide-react";
import { Button } from "@/components/ui/button";
import { Input } from "@/components/ui/input";
import { Select } from "@/components/ui/select";
import { cn } from "@/lib/cn";
import { type DraftAtom, type DraftErrors, draftAtom, isotopeChoices } from "../lib/target-draft";

/** An x beyond every atom typed so far, so a new atom never lands on top of one. */
function freeX(atoms: DraftAtom[]) {
  const xs = atoms.map((atom) => Number(atom.x)).filter(Number.isFinite);
  return xs.length ? Math.max(...xs) + 1 : 0;
}

/** The isotope an atom gets when none is chosen (the element's default, as the server applies it). */
function mostCommon(symbol: string, choices: ReturnType<typeof isotopeChoices>) {
  if (!isElementSymbol(symbol)) return null;
  const massNumber = getElement(symbol).defaultIsotope?.massNumber;
  return choices.find((choice) => choice.massNumber === massNumber) ?? null;
}

const percent = (value: number) => (value >= 1 ? value.toFixed(2) : value.toPrecision(3));

const SUPERSCRIPT = "⁰¹²³⁴⁵⁶⁷⁸⁹";
const superscript = (n: number) =>
  String(n)
    .split("")
    .map((d) => SUPERSCRIPT[Number(d)])
    .join("");

/** "²H · 2.014102 u · 0.0115 %" for the isotope picker: nuclide, mass and natural abundance. */
function isotopeLabel(symbol: string, choice: ReturnType<typeof isotopeChoices>[number]) {
  const abundance =
    choice.abundancePercent === null ? "not natural" : `${percent(choice.abundancePercent)} %`;
  return `${superscript(choice.massNumber)}${symbol} · ${choice.massU.toFixed(6)} u · ${abundance}`;
}

function ErrorText({ id, text }: { id: string; text?: string }) {
  return text ? (
    <p id={id} className="mt-1 text-xs font-medium text-ember-700">
      {text}
    </p>
  ) : null;
}

type AtomTableProps = {
  atoms: DraftAtom[];
  errors: DraftErrors;
  onChange: (atoms: DraftAtom[]) => void;
};

/**
 * The atoms as an editable table: element, isotope (mass in u and natural abundance in %), x, y, z in Å.
 * Each field carries its own message (aria-invalid, aria-describedby).
 */
export function AtomTable({ atoms, errors, onChange }: AtomTableProps) {
  const update = (index: number, patch: Partial<DraftAtom>) =>
    onChange(atoms.map((atom, i) => (i === index ? { ...atom, ...patch } : atom)));
  const cell = "px-1.5 py-1.5 align-top";
  return (
    <div>
      <div className="overflow-x-auto rounded-xl border border-ink-100 bg-white">
        <table className="w-full border-collapse text-left text-sm">
          <caption className="sr-only">Atoms being edited</caption>
          <thead className="border-b border-ink-100 bg-ink-50/70 text-xs font-semibold tracking-wide text-ink-500 uppercase">
            <tr>
              <th scope="col" className="px-2 py-2">
                #
              </th>
              <th scope="col" className="px-2 py-2">
                Element
              </th>
              <th scope="col" className="px-2 py-2">
                Isotope · mass (u) · abundance
              </th>
              <th scope="col" className="px-2 py-2">
                x (Å)
              </th>
              <th scope="col" className="px-2 py-2">
                y (Å)
              </th>
              <th scope="col" className="px-2 py-2">
                z (Å)
              </th>
              <th scope="col" className="px-2 py-2">
                <span className="sr-only">Remove</span>
              </th>
            </tr>
          </thead>
          <tbody className="divide-y divide-ink-50">
            {atoms.map((atom, i) => {
              const n = i + 1;
              const fieldError = (field: string) => errors[`atoms.${i}.${field}`];
              const errorId = (field: string) => `${atom.key}-${field}-error`;
              const aria = (field: string) =>
                fieldError(field)
                  ? { "aria-invalid": true as const, "aria-describedby": errorId(field) }
                  : {};
              const choices = isotopeChoices(atom.symbol, atom.massNumber);
              const common = mostCommon(atom.symbol, choices);
              return (
                <tr key={atom.key}>
                  <td className={cn(cell, "pt-3 font-mono text-xs text-ink-500")}>{n}</td>
                  <td className={cn(cell, "w-16 min-w-16")}>
                    <Input
                      aria-label={`Atom ${n} element`}
                      value={atom.symbol}
                      onChange={(event) => update(i, { symbol: event.target.value, massNumber: null })}
                      className="h-8 font-mono text-xs"
                      autoComplete="off"
                      spellCheck={false}
                      {...aria("symbol")}
                    />
                    <ErrorText id={errorId("symbol")} text={fieldError("symbol")} />
                  </td>
                  <td className={cell}>
                    <Select
                      aria-label={`Atom ${n} isotope`}
                      controlSize="sm"
                      value={atom.massNumber === null ? "" : String(atom.massNumber)}
                      disabled={choices.length === 0}
                      onChange={(event) =>
                        update(i, {
                          massNumber: event.target.value === "" ? null : Number(event.target.value),
                        })
                      }
                      className="w-[18.5rem] tabular-nums"
                    >
                      <option value="">{common ? isotopeLabel(atom.symbol, common) : "most common"}</option>
                      {choices
                        // The first option already stands for the most common isotope, unless it is pinned.
                        .filter((choice) => choice !== common || atom.massNumber === choice.massNumber)
                        .map((choice) => (
                          <option key={choice.massNumber} value={choice.massNumber}>
                            {isotopeLabel(atom.symbol, choice)}
                          </option>
                        ))}
                    </Select>
                  </td>
                  {(["x", "y", "z"] as const).map((axis) => (
                    <td key={axis} className={cell}>
                      <Input
                        aria-label={`Atom ${n} ${axis} (Å)`}
                        value={atom[axis]}
                        inputMode="decimal"
                        onChange={(event) => update(i, { [axis]: event.target.value })}
                        // Room for "-12.345678" while typing; digits of equal width line up in columns.
                        className="h-8 min-w-[calc(11ch+1.5rem)] font-mono text-xs tabular-nums"
                        autoComplete="off"
                        spellCheck={false}
                        {...aria(axis)}
                      />
                      <ErrorText id={errorId(axis)} text={fieldError(axis)} />
                    </td>
                  ))}
                  <td className={cell}>
                    <Button
                      variant="ghost-danger"
                      size="sm"
                      aria-label={`Remove atom ${n}`}
                      onClick={() => onChange(atoms.filter((_, j) => j !== i))}
                    >
                      <Trash2 className="size-4" aria-hidden="true" />
                    </Button>
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
      {errors.atoms ? <p className="mt-2 text-sm font-medium text-ember-700">{errors.atoms}</p> : null}
      <Button
        variant="secondary"
        size="sm"
        className="mt-2"
        onClick={() => onChange([...atoms, draftAtom("H", null, [freeX(atoms), 0, 0])])}
      >
        <Plus className="size-4" aria-hidden="true" />
        Add atom
      </Button>
    </div>
  );
}
