import type { DrillDocument } from '../drill/schema'

export type DrillFileFormat = 'json' | 'midi' | 'musicxml' | 'mxl'

/** 200 of POST /api/ensembles/:id/drills/import with preview=1: the parsed drill, nothing saved. */
export interface DrillImportPreview {
  preview: true
  format: DrillFileFormat
  drill: DrillDocument
  /** What the import did that a person should know (crossing voices, divided parts), naming the bar. */
  warnings: string[]
  parts: string[]
  chords: number
  /** The ensemble's section names, for renaming imported parts (field `parts` of the import). */
  sections: string[]
}

/** Formats of GET /api/drills/:id/export. */
export const DRILL_EXPORT_FORMATS = ['musicxml', 'midi', 'json'] as const
export type DrillExportFormat = (typeof DRILL_EXPORT_FORMATS)[number]
