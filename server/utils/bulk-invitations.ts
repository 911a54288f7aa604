import type { Knex } from 'knex'
import type { BulkPreview, BulkRow } from '../../shared/types/ensemble'
import { checkRows, parseInvitationCsv, type CsvError } from '../../shared/people/invitation-csv'
import type { Actor } from './ensemble-settings'
import { insertInvitation, type IssuedInvitation } from './invitations'

async function context (db: Knex, ensembleId: number) {
  const sections = await db('sections').where({ ensemble_id: ensembleId }).orderBy('position').select('id', 'name')
  const members = await db('memberships as m').join('users as u', 'u.id', 'm.user_id').where('m.ensemble_id', ensembleId).pluck('u.email')
  const open = await db('invitations').where({ ensemble_id: ensembleId }).whereNull('accepted_at').whereNull('revoked_at')
    .where('expires_at', '>', new Date().toISOString()).pluck('email')
  return { sections, memberEmails: new Set<string>(members), openInvitationEmails: new Set<string>(open) }
}

/** Reads and checks a bulk file against the ensemble; nothing is stored or sent. */
export async function previewBulkInvitations (db: Knex, ensembleId: number, csv: string): Promise<{ ok: true, preview: BulkPreview } | { ok: false, error: CsvError }> {
  const parsed = parseInvitationCsv(csv)
  if (!parsed.ok) return parsed
  const rows = checkRows(parsed.rows, await context(db, ensembleId))
  const goodCount = rows.filter(r => r.ok).length
  return { ok: true, preview: { rows, goodCount, badCount: rows.length - goodCount, delimiter: parsed.delimiter } }
}


/**
 * Stores an invitation for every good row of the file, checked again at this moment, in one
 * transaction. With bad rows and without `sendGood`, nothing is stored (`bad_rows`).
 */
export async function createBulkInvitations (db: Knex, ensembleId: number, actor: Actor, csv: string, sendGood: boolean, ttlMs: number):
  Promise<{ ok: true, issued: IssuedInvitation[], skipped: BulkRow[] } | { ok: false, error: CsvError } | { ok: false, code: 'bad_rows' | 'nothing_to_send', preview: BulkPreview }> {
  return db.transaction(async (trx) => {
    const checked = await previewBulkInvitations(trx, ensembleId, csv)
    if (!checked.ok) return checked
    const { preview } = checked
    if (preview.badCount > 0 && !sendGood) return { ok: false, code: 'bad_rows', preview }
    if (preview.goodCount === 0) return { ok: false, code: 'nothing_to_send', preview }
    const issued: IssuedInvitation[] = []
    for (const row of preview.rows.filter(r => r.ok)) {
      const inv = await insertInvitation(trx, ensembleId, actor, { email: row.email, role: row.role!, sectionId: row.sectionId, name: row.name }, ttlMs)
      issued.push(inv)
    }
    return { ok: true, issued, skipped: preview.rows.filter(r => !r.ok) }
  })
}
