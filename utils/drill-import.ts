import type { DrillImportResult } from '#shared/types/drill-view'
import type { DrillImportPreview } from '#shared/types/drill-import'

export interface DrillImportOptions {
  title?: string
  /** Bars to keep, such as "3-6". */
  bars?: string
  /** Imported part name → new name (a section's). */
  names?: Record<string, string>
}

function importForm(file: File, opts: DrillImportOptions, preview: boolean): FormData {
  const body = new FormData()
  if (opts.title?.trim()) body.append('title', opts.title.trim())
  if (opts.bars?.trim()) body.append('bars', opts.bars.trim())
  if (opts.names && Object.keys(opts.names).length) body.append('parts', JSON.stringify(opts.names))
  if (preview) body.append('preview', '1')
  body.append('file', file, file.name)
  return body
}

/** Sends a drill file (MusicXML, .mxl, MIDI or drill JSON) to be imported into an ensemble. */
export function importDrill(ensembleId: number, file: File, title?: string, opts: DrillImportOptions = {}): Promise<DrillImportResult> {
  return $fetch<DrillImportResult>(`/api/ensembles/${ensembleId}/drills/import`, { method: 'POST', body: importForm(file, { ...opts, title }, false) })
}

/** Reads a drill file on the server and returns the drill it makes, saving nothing. */
export function previewDrillImport(ensembleId: number, file: File, opts: DrillImportOptions = {}): Promise<DrillImportPreview> {
  return $fetch<DrillImportPreview>(`/api/ensembles/${ensembleId}/drills/import`, { method: 'POST', body: importForm(file, opts, true) })
}
