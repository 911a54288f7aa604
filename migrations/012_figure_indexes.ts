import type { Knex } from 'knex'

// Indexes the ensemble statistics and the holds CSV read through. An analysis row carries its
// measurement and report (several kilobytes each), so finding a take's current analysis from the
// partial index alone still read the whole row to check `is_current`; with both columns in one
// index the lookup never touches the row. A take's holds are read from one index holding every
// column the figures use. Takes are found by ensemble and status instead of by status across
// every ensemble.
export async function up (knex: Knex): Promise<void> {
  await knex.raw('create index if not exists analyses_take_current on analyses (take_id, is_current)')
  await knex.raw(`create index if not exists hold_results_figures on hold_results
    (analysis_id, cents_from_target, cents_from_equal, chord_index, member, within_tolerance)`)
  await knex.raw('create index if not exists takes_ensemble_status on takes (ensemble_id, status, id)')
}

export async function down (knex: Knex): Promise<void> {
  await knex.raw('drop index if exists takes_ensemble_status')
  await knex.raw('drop index if exists hold_results_figures')
  await knex.raw('drop index if exists analyses_take_current')
}
