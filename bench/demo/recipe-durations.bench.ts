/**
 * How long the demo recipes take here, end to end: a whole Sigmaflow (own PostgreSQL, server, worker,
 * development host; production settings) with the demo codes and recipes registered through the API,
 * each recipe run N times one after another (default 3) for one demo target. Prints, per recipe, the
 * median and maximum from submission to `done` and to derived results.
 *
 *   node --import tsx bench/demo/recipe-durations.bench.ts [runs=3] [--target=Water]
 */
import { hfOrbitalsCode } from "../../deploy/demo/codes/psi4-orbitals";
import { radialScatterCode } from "../../deploy/demo/codes/radial-scatter";
import { DEMO_RECIPES, DEMO_RUNS } from "../../deploy/demo/science-scenario";
import { DEMO_TARGETS } from "../../deploy/demo/targets";
import { quantile, startEngineStack } from "../engine/stack";

const args = process.argv.slice(2);
const repeats = Number(args.find((a) => /^\d+$/.test(a)) ?? 3);
const targetName = args.find((a) => a.startsWith("--target="))?.slice("--target=".length) ?? "Water";

const stack = await startEngineStack({ code: hfOrbitalsCode });
try {
  const { api } = stack;
  const me = await api("GET", "/api/me");
  const groupId = me.body.memberships[0].groupId as string;
  const expect201 = (r: { status: number; body: unknown }, what: string) => {
    if (r.status !== 201) throw new Error(`${what}: ${r.status} ${JSON.stringify(r.body)}`);
    return (r.body as { id: string }).id;
  };
  const codes = (await api("GET", `/api/groups/${groupId}/codes`)).body.codes as {
    id: string;
    definition: { name: string };
  }[];
  const codeIds = new Map(codes.map((c) => [c.definition.name, c.id]));
  codeIds.set(
    radialScatterCode.name,
    expect201(await api("POST", `/api/groups/${groupId}/codes`, radialScatterCode), "radial-scatter"),
  );
  const target = DEMO_TARGETS.find((t) => t.name === targetName);
  if (!target) throw new Error(`no demo target named ${targetName}`);
  const targetId = expect201(await api("POST", `/api/groups/${groupId}/targets`, target), "target");
  for (const recipe of DEMO_RECIPES) {
    const recipeId = expect201(
      await api("POST", `/api/groups/${groupId}/recipes`, {
        name: recipe.name,
        stages: recipe.stages.map((s) => ({ name: s.name, codeId: codeIds.get(s.code) })),
      }),
      recipe.name,
    );
    const parameters = DEMO_RUNS.find((r) => r.recipe === recipe.name)!.parameters;
    const toDone: number[] = [];
    const toResults: number[] = [];
    for (let i = 0; i < repeats; i++) {
      const started = Date.now();
      const runId = expect201(
        await api("POST", `/api/groups/${groupId}/runs`, {
          spec: { name: `${recipe.name} ${i + 1}`, recipeId, hostId: stack.hostId, targetId, parameters },
          onDuplicate: "run",
        }),
        "run",
      );
      let done = 0;
      for (;;) {
        const run = (await api("GET", `/api/runs/${runId}`)).body;
        if (!done && ["done", "failed", "cancelled"].includes(run.state)) {
          if (run.state !== "done") throw new Error(`${recipe.name}: ${run.state} ${run.stateMessage}`);
          done = Date.now() - started;
        }
        if (run.resultsState === "derived" || run.resultsState === "failed") {
          if (run.resultsState === "failed") throw new Error(`${recipe.name}: ${run.resultsMessage}`);
          break;
        }
        if (Date.now() - started > 300_000) throw new Error(`${recipe.name}: no results after 300 s`);
        await new Promise((resolve) => setTimeout(resolve, 100));
      }
      toDone.push(done / 1000);
      toResults.push((Date.now() - started) / 1000);
    }
    const fmt = (values: number[]) => {
      const sorted = [...values].sort((a, b) => a - b);
      return `median ${quantile(sorted, 0.5).toFixed(1)} s, max ${sorted.at(-1)!.toFixed(1)} s`;
    };
    console.log(
      `${recipe.name} (${targetName}, ${repeats} runs): submit → done ${fmt(toDone)}; submit → results ${fmt(toResults)}`,
    );
  }
} finally {
  await stack.stop();
}
