// The holds CSV: one row per scored hold, written batch by batch with the socket's back-pressure
// respected, so 100,000 rows never sit in memory at once.
import type { ServerResponse } from 'node:http'
import type { Knex } from 'knex'
import { csvField, csvLine } from '../../shared/csv'
import { forEachHoldBatch, type CsvHoldRow, type HoldFilters, type Scoring } from './stats'

export const HOLDS_CSV_HEADER = ['take_id', 'submitted_at', 'player', 'section', 'drill', 'part', 'hold', 'note', 'member', 'target_hz', 'detected_hz', 'cents_from_target', 'cents_from_equal', 'within_tolerance']

/** A number rounded to `digits` places as CSV text (numbers never need quoting). */
const num = (v: number | null, digits: number) => (v == null || !Number.isFinite(v) ? '' : String(Number(v.toFixed(digits))))

/** The fields a take's holds share (take, time, player, section, drill, part), with the comma after them. */
export function takeCsvPrefix(h: CsvHoldRow): string {
  return `${[csvField(h.takeId), csvField(h.submittedAt), csvField(h.player, true), csvField(h.section, true), csvField(h.drill, true), csvField(h.part, true)].join(',')},`
}

/**
 * One CSV record of a hold; `hold` is the chord's number in the drill (from 1), as on the take
 * report. `prefix` is `takeCsvPrefix` of the same take, passed in when many holds share it.
 */
export function holdCsvRecord(h: CsvHoldRow, prefix = takeCsvPrefix(h)): string {
  return `${prefix}${h.chordIndex + 1},${csvField(h.note)},${csvField(h.member)},${num(h.targetHz, 4)},${num(h.detectedHz, 4)},${num(h.centsFromTarget, 3)},${num(h.centsFromEqual, 3)},${h.withinTolerance}\r\n`
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
      let takeId = -1
      let prefix = ''
      for (const r of rows) {
        if (r.takeId !== takeId) { takeId = r.takeId; prefix = takeCsvPrefix(r) }
        chunk += holdCsvRecord(r, prefix)
        if (chunk.length > 64_000) { await write(chunk); chunk = '' }
      }
      if (chunk) await write(chunk)
    }, { csv: true })
  } catch (err) {
    // The header is out, so no error status can follow: cut the body short (the client sees an
    // incomplete file rather than a complete-looking one) and log the cause.
    if (!closed) console.error('holds CSV stopped:', (err as Error).message)
    res.destroy()
  } finally {
    if (!res.writableEnded) res.end()
  }
}
