import { createKnex } from '/work/wt-charts/server/database/knex'
import { forEachHoldBatch } from '/work/wt-charts/server/utils/stats'
import { StatsBuilder } from '/work/wt-charts/shared/stats'
const db = createKnex('/tmp/vol.sqlite')
for (const f of [{ ensembleId: 1, sectionId: 3 }, { ensembleId: 1 }]) {
  const t0 = performance.now()
  const b = new StatsBuilder()
  await forEachHoldBatch(db, f, {}, (takes, rows) => { for (const t of takes) b.addTake(t); for (const r of rows) b.add(r) }, 2000)
  const r = b.result()
  console.log(JSON.stringify(f), 'takes', r.takes, 'holds', r.holds, Math.round(performance.now() - t0), 'ms', JSON.stringify(r.members[0]))
}
const t1 = performance.now()
const b = new StatsBuilder()
await forEachHoldBatch(db, { ensembleId: 1, sectionId: 3 }, { system: { name: 'equal', seventh: 'harmonic', fraction: '1/4' } as any }, (takes, rows) => { for (const t of takes) b.addTake(t); for (const r of rows) b.add(r) }, 2000)
console.log('rescored section', Math.round(performance.now() - t1), 'ms', b.result().holds)
await db.destroy()
