// The holds CSV: one row per scored hold, written batch by batch with the socket's back-pressure
// respected, so 100,000 rows never sit in memory at once.
import type { ServerResponse } from 'node:http'
import type { Knex } from 'knex'
import { csvField, csvLine } from '../../shared/csv'
import { forEachHoldBatch, type CsvHoldRow, type HoldFilters, type Scoring } from './stats'

export const HOLDS_CSV_HEADER = ['take_id', 'submitted_at', 'player', 'section', 'drill', 'part', 'hold', 'note', 'member', 'target_hz', 'detected_hz', 'cents_from_target', 'cents_from_equal', 'within_tolerance']

const round = (v: number | null, digits: number) => (v == null ? null : Number(v.toFixed(digits)))

/** One CSV record of a hold; `hold` is the chord's number in the drill (from 1), as on the take report. */
export function holdCsvRecord(h: CsvHoldRow): string {
  return csvLine([
    csvField(h.takeId), csvField(h.submittedAt), csvField(h.player, true), csvField(h.section, true), csvField(h.drill, true),
    csvField(h.part, true), csvField(h.chordIndex + 1), csvField(h.note), csvField(h.member),
    csvField(round(h.targetHz, 4)), csvField(round(h.detectedHz, 4)), csvField(round(h.centsFromTarget, 3)),
    csvField(round(h.centsFromEqual, 3)), csvField(h.withinTolerance),
  ])
}

function drainOrClose(res: ServerResponse): Promise<void> {
  return new Promise((done) => {
    const finish = () => { res.off('drain', finish); res.off('close', finish); done() }
    res.on('drain', finish)
    res.on('close', finish)
  })
}

/** Streams the CSV to the response and ends it. */
export async function writeHoldsCsv(db: Knex, res: ServerResponse, f: HoldFilters, s: Scoring): Promise<void> {
  res.statusCode = 200
  let closed = false
  res.once('close', () => { closed = true })
  const write = async (text: string) => {
    if (closed) throw new Error('client went away')
    if (!res.write(text)) await drainOrClose(res)
  }
  try {
    await write(csvLine(HOLDS_CSV_HEADER))
    await forEachHoldBatch(db, f, s, async (_takes, rows) => {
      let chunk = ''
      for (const r of rows) {
        chunk += holdCsvRecord(r)
        if (chunk.length > 64_000) { await write(chunk); chunk = '' }
      }
      if (chunk) await write(chunk)
    })
  } catch (err) {
    // The header is out, so no error status can follow: cut the body short (the client sees an
    // incomplete file rather than a complete-looking one) and log the cause.
    if (!closed) console.error('holds CSV stopped:', (err as Error).message)
    res.destroy()
  } finally {
    if (!res.writableEnded) res.end()
  }
}
