import { startEngineStack } from "./stack";
const stack = await startEngineStack({ durable: true, maxConcurrentRuns: 1000, code: { name: "noop", version: "1.0", executable: "/bin/true" } });
const warm = await stack.submit("warm");
await new Promise((r) => setTimeout(r, 3000));
const t0 = Date.now();
const ids: string[] = [];
let next = 0;
const sub = Promise.all(Array.from({ length: 32 }, async () => { while (next < 200) { next++; ids.push(await stack.submit(`n${next}`)); } }));
for (let i = 0; i < 30; i++) {
  await new Promise((r) => setTimeout(r, 1000));
  const s = await stack.statesOf(ids);
  const { rows } = await stack.pool.query(`select application_name, state, wait_event_type, wait_event, left(query, 80) q from pg_stat_activity where datname='sigmaflow_bench' and state <> 'idle' and pid <> pg_backend_pid()`);
  const { rows: boss } = await stack.pool.query(`select name, state, count(*)::int from pgboss.job group by 1,2 order by 1,2`);
  console.log(((Date.now() - t0) / 1000).toFixed(0), JSON.stringify(s), JSON.stringify(boss.map((b) => `${b.name}:${b.state}:${b.count}`)));
  for (const r of rows) console.log("   ", r.application_name, r.state, r.wait_event_type, r.wait_event, r.q);
  if ((s.done ?? 0) === 200) break;
}
await sub;
await stack.stop();
