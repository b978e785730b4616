import type { Code, Recipe } from "@shared/schemas";
import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { ArrowDown, ArrowUp, X } from "lucide-react";
import { useState } from "react";
import { Button } from "@/components/ui/button";
import { Card, CardBody, CardHeader } from "@/components/ui/card";
import { ConfirmDialog } from "@/components/ui/dialog";
import { ErrorState } from "@/components/ui/error-state";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { Notice } from "@/components/ui/notice";
import { Select } from "@/components/ui/select";
import { TableSkeleton } from "@/components/ui/skeleton";
import { isApiRequestError } from "@/lib/api-error";
import { createRecipe, deleteRecipe } from "../api/code-commands";
import { codeQueries, recipeQueries } from "../api/code-queries";
import { type ChainStage, StageChain } from "./stage-chain";

const codeLabel = (code: Code) => `${code.definition.name} ${code.definition.version}`;

/** Field messages from a 422's issue list, or a 409 that names one field. */
function fieldMessages(error: unknown): Record<string, string> {
  if (!isApiRequestError(error)) return {};
  const details = error.details;
  const result: Record<string, string> = {};
  if (Array.isArray(details)) {
    for (const item of details) {
      if (item && typeof item.path === "string" && typeof item.message === "string" && !(item.path in result))
        result[item.path] = item.message;
    }
  } else if (
    details &&
    typeof details === "object" &&
    "path" in details &&
    typeof details.path === "string"
  ) {
    result[details.path] = error.message;
  }
  return result;
}

type DraftStage = { key: number; name: string; codeId: string };

type BuilderStart = { name: string; description: string; stages: { name: string; codeId: string }[] };

const EMPTY_START: BuilderStart = { name: "", description: "", stages: [{ name: "stage-1", codeId: "" }] };

function RecipeBuilder({
  groupId,
  codes,
  start,
  onDone,
}: {
  groupId: string;
  codes: Code[];
  start: BuilderStart;
  onDone: () => void;
}) {
  const queryClient = useQueryClient();
  const [name, setName] = useState(start.name);
  const [description, setDescription] = useState(start.description);
  const [nextKey, setNextKey] = useState(start.stages.length + 1);
  const [stages, setStages] = useState<DraftStage[]>(() =>
    start.stages.map((stage, index) => ({ key: index + 1, ...stage })),
  );
  const create = useMutation({
    mutationFn: () =>
      createRecipe(groupId, {
        name,
        description,
        stages: stages.map((stage) => ({ name: stage.name, codeId: stage.codeId })),
      }),
    onSuccess: async () => {
      await queryClient.invalidateQueries({ queryKey: recipeQueries.all });
      onDone();
    },
  });
  const errors = fieldMessages(create.error);
  const byId = new Map(codes.map((code) => [code.id, code]));

  const update = (key: number, change: Partial<DraftStage>) =>
    setStages(stages.map((stage) => (stage.key === key ? { ...stage, ...change } : stage)));
  const move = (index: number, step: -1 | 1) => {
    const next = [...stages];
    const [moved] = next.splice(index, 1);
    next.splice(index + step, 0, moved!);
    setStages(next);
  };

  const chain: ChainStage[] = stages.map((stage) => {
    const code = byId.get(stage.codeId);
    return {
      id: String(stage.key),
      name: stage.name,
      codeLabel: code ? codeLabel(code) : "no code chosen",
      definition: code?.definition ?? null,
    };
  });

  return (
    <Card>
      <CardHeader
        title="New recipe"
        description="Stages run one after another on one host; each stage's collected files are copied into the next stage's folder. A saved recipe does not change: to change one, copy it into a new recipe."
      />
      <CardBody>
        <form
          className="flex flex-col gap-4"
          onSubmit={(event) => {
            event.preventDefault();
            create.mutate();
          }}
        >
          <div className="grid gap-3 sm:grid-cols-2">
            <Field label="Recipe name" error={errors.name} hint="Letters, digits, '-' and '_'.">
              {(control) => <Input {...control} value={name} onChange={(e) => setName(e.target.value)} />}
            </Field>
            <Field label="Description" error={errors.description}>
              {(control) => (
                <Input {...control} value={description} onChange={(e) => setDescription(e.target.value)} />
              )}
            </Field>
          </div>
          <fieldset className="flex flex-col gap-2">
            <legend className="mb-1 text-sm font-medium text-ink-800">Stages</legend>
            {errors.stages ? (
              <p role="alert" className="text-sm font-medium text-ember-700">
                {errors.stages}
              </p>
            ) : null}
            {stages.map((stage, index) => (
              <div key={stage.key} className="grid items-start gap-2 sm:grid-cols-[2rem_1fr_1.4fr_auto]">
                <span className="pt-8 text-sm text-ink-500 tabular-nums">{index + 1}.</span>
                <Field label={`Stage ${index + 1} name`} error={errors[`stages.${index}.name`]}>
                  {(control) => (
                    <Input
                      {...control}
                      value={stage.name}
                      onChange={(e) => update(stage.key, { name: e.target.value })}
                    />
                  )}
                </Field>
                <Field label={`Stage ${index + 1} code`} error={errors[`stages.${index}.codeId`]}>
                  {(control) => (
                    <Select
                      {...control}
                      value={stage.codeId}
                      onChange={(e) => update(stage.key, { codeId: e.target.value })}
                    >
                      <option value="">Choose a code…</option>
                      {codes.map((code) => (
                        <option key={code.id} value={code.id}>
                          {codeLabel(code)}
                        </option>
                      ))}
                    </Select>
                  )}
                </Field>
                <div className="flex gap-1 pt-7">
                  <Button
                    size="sm"
                    variant="ghost"
                    aria-label={`Move stage ${index + 1} up`}
                    disabled={index === 0}
                    onClick={() => move(index, -1)}
                  >
                    <ArrowUp className="size-4" aria-hidden="true" />
                  </Button>
                  <Button
                    size="sm"
                    variant="ghost"
                    aria-label={`Move stage ${index + 1} down`}
                    disabled={index === stages.length - 1}
                    onClick={() => move(index, 1)}
                  >
                    <ArrowDown className="size-4" aria-hidden="true" />
                  </Button>
                  <Button
                    size="sm"
                    variant="ghost-danger"
                    aria-label={`Remove stage ${index + 1}`}
                    disabled={stages.length === 1}
                    onClick={() => setStages(stages.filter((s) => s.key !== stage.key))}
                  >
                    <X className="size-4" aria-hidden="true" />
                  </Button>
                </div>
              </div>
            ))}
            <div>
              <Button
                size="sm"
                variant="secondary"
                disabled={stages.length >= 10}
                onClick={() => {
                  setStages([...stages, { key: nextKey, name: `stage-${stages.length + 1}`, codeId: "" }]);
                  setNextKey(nextKey + 1);
                }}
              >
                Add stage
              </Button>
              <span className="ml-2 text-xs text-ink-500">At most 10 stages.</span>
            </div>
          </fieldset>
          <div>
            <h3 className="mb-2 text-sm font-medium text-ink-800">What flows between the stages</h3>
            <StageChain stages={chain} label="Stages of the new recipe" />
          </div>
          {create.isError && Object.keys(errors).length === 0 ? (
            <Notice tone="error">{create.error.message}</Notice>
          ) : null}
          <div className="flex gap-2">
            <Button type="submit" pending={create.isPending}>
              Create recipe
            </Button>
            <Button variant="secondary" onClick={onDone} disabled={create.isPending}>
              Cancel
            </Button>
          </div>
        </form>
      </CardBody>
    </Card>
  );
}

function RecipeItem({
  recipe,
  byId,
  canWrite,
  onCopy,
}: {
  recipe: Recipe;
  byId: Map<string, Code>;
  canWrite: boolean;
  onCopy: (start: BuilderStart) => void;
}) {
  const queryClient = useQueryClient();
  const [confirming, setConfirming] = useState(false);
  const remove = useMutation({
    mutationFn: () => deleteRecipe(recipe.id),
    onSuccess: async () => {
      setConfirming(false);
      await queryClient.invalidateQueries({ queryKey: recipeQueries.all });
    },
  });
  const chain: ChainStage[] = recipe.stages.map((stage) => ({
    id: stage.name,
    name: stage.name,
    codeLabel: stage.codeVersion ? `${stage.codeName} ${stage.codeVersion}` : stage.codeName,
    definition: byId.get(stage.codeId)?.definition ?? null,
  }));
  return (
    <li className="flex flex-col gap-3 border-b border-ink-100 py-4 last:border-b-0">
      <div className="flex items-start justify-between gap-4">
        <div>
          <h3 className="font-medium text-ink-900">{recipe.name}</h3>
          {recipe.description ? <p className="text-sm text-ink-600">{recipe.description}</p> : null}
          <p className="text-xs text-ink-500">
            {recipe.stages.length} {recipe.stages.length === 1 ? "stage" : "stages"}
          </p>
        </div>
        {canWrite ? (
          <div className="flex gap-1">
            <Button
              size="sm"
              variant="ghost"
              aria-label={`Copy ${recipe.name} into a new recipe`}
              onClick={() =>
                onCopy({
                  name: `${recipe.name}-copy`,
                  description: recipe.description,
                  stages: recipe.stages.map((stage) => ({
                    name: stage.name,
                    codeId: byId.has(stage.codeId) ? stage.codeId : "",
                  })),
                })
              }
            >
              Copy
            </Button>
            <Button size="sm" variant="ghost-danger" onClick={() => setConfirming(true)}>
              Delete
            </Button>
          </div>
        ) : null}
      </div>
      <StageChain stages={chain} label={`Stages of ${recipe.name}`} />
      <ConfirmDialog
        open={confirming}
        title={`Delete the recipe ${recipe.name}?`}
        confirmLabel="Delete recipe"
        pending={remove.isPending}
        error={remove.error}
        onConfirm={() => remove.mutate()}
        onClose={() => {
          setConfirming(false);
          remove.reset();
        }}
      >
        Its codes stay registered. A recipe that runs have used cannot be deleted.
      </ConfirmDialog>
    </li>
  );
}

/** The group's recipes as chains of stages, and a builder for a new one. */
export function RecipesPanel({ groupId, canWrite }: { groupId: string; canWrite: boolean }) {
  const recipes = useQuery(recipeQueries.list(groupId));
  const codes = useQuery(codeQueries.list(groupId));
  const [building, setBuilding] = useState<{ key: number; start: BuilderStart } | null>(null);
  const build = (start: BuilderStart) => setBuilding({ key: (building?.key ?? 0) + 1, start });
  const codeList = codes.data?.codes ?? [];
  const byId = new Map(codeList.map((code) => [code.id, code]));
  // A retired version keeps its recipes, but a new recipe cannot use it, so the builder does not offer it.
  const activeCodes = codeList.filter((code) => !code.retiredAt);
  return (
    <div className="flex flex-col gap-4">
      <Card>
        <CardHeader
          title="Recipes"
          description="Chains of stages, each running one registered code version."
          actions={
            canWrite && !building ? (
              <Button size="sm" onClick={() => build(EMPTY_START)} disabled={activeCodes.length === 0}>
                New recipe
              </Button>
            ) : null
          }
        />
        <CardBody className="py-1">
          {recipes.isPending ? (
            <TableSkeleton rows={2} label="Loading recipes" />
          ) : recipes.isError ? (
            <ErrorState
              error={recipes.error}
              onRetry={() => recipes.refetch()}
              retrying={recipes.isFetching}
            />
          ) : recipes.data.recipes.length === 0 ? (
            <p className="py-4 text-sm text-ink-500">No recipes yet.</p>
          ) : (
            <ul>
              {recipes.data.recipes.map((recipe) => (
                <RecipeItem key={recipe.id} recipe={recipe} byId={byId} canWrite={canWrite} onCopy={build} />
              ))}
            </ul>
          )}
        </CardBody>
      </Card>
      {building ? (
        <RecipeBuilder
          key={building.key}
          groupId={groupId}
          codes={activeCodes}
          start={building.start}
          onDone={() => setBuilding(null)}
        />
      ) : null}
    </div>
  );
}
