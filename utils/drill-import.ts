import type { DrillImportResult } from '#shared/types/drill-view'

/** Sends a drill file (JSON document or Standard MIDI File) to be imported into an ensemble. */
export function importDrill(ensembleId: number, file: File, title?: string): Promise<DrillImportResult> {
  const body = new FormData()
  body.append('file', file, file.name)
  if (title && title.trim()) body.append('title', title.trim())
  return $fetch<DrillImportResult>(`/api/ensembles/${ensembleId}/drills/import`, { method: 'POST', body })
}

