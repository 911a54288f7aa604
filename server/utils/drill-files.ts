import type { Knex } from 'knex'
import { readDrillFile, renameParts, type DrillFileResult } from '../../shared/drill/import'
import { drillToMusicXml, exportFileName } from '../../shared/drill/export-musicxml'
import { drillToMidi } from '../../shared/drill/export-midi'
import type { DrillDocument } from '../../shared/drill/schema'
import type { DrillExportFormat } from '../../shared/types/drill-import'
import type { DrillFileProblem } from './drills'

/**
 * A drill from an uploaded file (MusicXML, .mxl, MIDI or drill JSON) with its parts renamed as
 * asked, or why it cannot be read: the route answers 415 for `not_a_drill`, else 400.
 */
export function drillFromFile (bytes: Uint8Array, opts: { fileName?: string | null, title?: string, bars?: string, names?: Record<string, string> }): DrillFileResult | DrillFileProblem {
  try {
    const result = readDrillFile(bytes, { fileName: opts.fileName ?? undefined, title: opts.title, bars: opts.bars })
    const drill = opts.names && Object.keys(opts.names).length ? renameParts(result.drill, opts.names) : result.drill
    return { ...result, drill }
  } catch (err) {
    const e = err as { name?: string, code?: string, message?: string, path?: string | null, issues?: unknown[] }
    if (e?.name !== 'TuningError') throw err
    if (e.code === 'unknown_format') return { refused: 'not_a_drill', message: 'Not a drill file', details: { message: e.message, expected: 'MusicXML (.musicxml, .xml, .mxl), a Standard MIDI File (.mid) or a drill document (.json)' } }
    return { refused: e.code ?? 'invalid_drill', message: 'Invalid drill file', details: { message: e.message, path: e.path ?? null, issues: e.issues ?? [] } }
  }
}

const TYPES: Record<DrillExportFormat, { type: string, ext: string }> = {
  // The media type registered for uncompressed MusicXML (MusicXML 4.0, "MusicXML media types").
  musicxml: { type: 'application/vnd.recordare.musicxml+xml', ext: 'musicxml' },
  midi: { type: 'audio/midi', ext: 'mid' },
  json: { type: 'application/json', ext: 'json' },
}

/** A drill as a file: its bytes, content type and a file name from its title. */
export function drillExport (doc: DrillDocument, format: DrillExportFormat, pitch: 'written' | 'concert' = 'written'): { body: string | Uint8Array, type: string, fileName: string } {
  const { type, ext } = TYPES[format]
  const body = format === 'musicxml' ? drillToMusicXml(doc, { pitch }) : format === 'midi' ? drillToMidi(doc) : `${JSON.stringify(doc, null, 2)}\n`
  return { body, type, fileName: exportFileName(doc.title, ext) }
}

/** Content-Disposition for a download: an ASCII fallback name and the UTF-8 name (RFC 6266). */
export function attachment (fileName: string): string {
  const ascii = fileName.normalize('NFKD').replace(/[^\x20-\x7e]/g, '').replace(/["\\]/g, '') || 'drill'
  return `attachment; filename="${ascii}"; filename*=UTF-8''${encodeURIComponent(fileName)}`
}

/** Names of an ensemble's sections in their order (what imported parts are renamed to). */
export async function sectionNames (db: Knex, ensembleId: number): Promise<string[]> {
  const rows = await db('sections').where({ ensemble_id: ensembleId }).orderBy([{ column: 'position' }, { column: 'id' }]).select('name')
  return rows.map(r => r.name as string)
}
