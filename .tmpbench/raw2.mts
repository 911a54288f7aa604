import Database from 'better-sqlite3'
import { StatsBuilder } from '/work/wt-charts/shared/stats'
const db = new Database('/tmp/vol.sqlite', { readonly: true })
const sql = `SELECT t.id, t.created_at, t.user_id, u.name, s.name, t.drill_id, t.part, h.chord_index, h.member, h.cents_from_target, h.within_tolerance
FROM takes t JOIN analyses a ON a.take_id = t.id AND a.is_current = 1 JOIN users u ON u.id = t.user_id
LEFT JOIN memberships m ON m.user_id = t.user_id AND m.ensemble_id = t.ensemble_id LEFT JOIN sections s ON s.id = m.section_id
LEFT JOIN hold_results h ON h.analysis_id = a.id AND h.cents_from_target IS NOT NULL AND abs(coalesce(h.cents_from_equal,0)) <= 100
WHERE t.ensemble_id = 1 AND t.status = 'analysed' AND t.withdrawn_at IS NULL`
let t0 = performance.now()
const rows = db.prepare(sql).raw(true).all()
console.log('fetch', rows.length, Math.round(performance.now() - t0))
t0 = performance.now()
const b = new StatsBuilder()
for (const r of rows) {
  const t = { takeId: r[0], submittedAt: r[1], userId: r[2], player: r[3], section: r[4], drillId: r[5], part: r[6] }
  if (r[9] == null) b.addTake(t); else b.add({ ...t, chordIndex: r[7], member: r[8], centsFromTarget: r[9], withinTolerance: !!r[10] })
}
console.log('add', Math.round(performance.now() - t0))
t0 = performance.now(); b.result(); console.log('result', Math.round(performance.now() - t0))
