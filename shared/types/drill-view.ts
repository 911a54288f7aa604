// GET /api/drills/:id, once for the server and the drill and take pages.
import type { DrillDocument } from '../drill/schema'
import type { TargetsResult } from '../tuning/index'
import type { EnsembleRole } from './user'
import type { TakeUploadLimits } from './take'

/** An open assignment of the caller's for this drill (the take form links a take to it). */
export interface DrillOpenAssignment {
  id: number
  title: string | null
  /** The part it asks for (null when no part fits the caller's section). */
  part: string | null
  dueAt: string | null
  submitted: boolean
  /** Takes the caller may still send for it (null = no limit). */
  attemptsLeft?: number | null
}

/** GET /api/drills/:id */
export interface DrillView {
  id: number
  /** Saved version of the document; PUT /api/drills/:id sends it back. */
  version: number
  archivedAt: string | null
  updatedAt: string
  ensembleId: number
  ensembleName: string
  role: EnsembleRole
  document: DrillDocument
  /** Null when the drill's own system cannot be computed (then `targetsError` says why). */
  targets: TargetsResult | null
  targetsError: { code: string, message: string } | null
  preselectedPart: string | null
  openAssignments: DrillOpenAssignment[]
  limits: TakeUploadLimits
}

/** A row of GET /api/ensembles/:id/drills. */
export interface DrillListItem {
  id: number
  title: string
  key: string
  tempo: number
  a4: number
  system: DrillDocument['system']
  tolerance: number
  parts: { name: string, instrument: string | null }[]
  chords: number
  version: number
  /** Takes recorded against the drill (kept when it is archived). */
  takes: number
  createdAt: string
  updatedAt: string
  archivedAt: string | null
}

/** 201 of POST /api/ensembles/:id/drills/import */
export interface DrillImportResult {
  id: number
  parts: string[]
  chords: number
  /** What the import did that a person should know (crossing voices, divided parts), naming the bar. */
  warnings: string[]
}
