// Response shapes of the drill writing routes; the server and the pages both import these
// (GET /api/drills/:id and the list rows live in drill-view.ts).
import type { DrillDocument } from '../drill/schema'

/** 201 of POST /api/ensembles/:id/drills and of POST /api/drills/:id/duplicate. */
export interface DrillCreated { id: number, version: number }

/** 200 of PUT /api/drills/:id. */
export interface DrillUpdated { version: number }

/** `data` of the 409 `version_conflict` of PUT /api/drills/:id. */
export interface DrillConflict {
  code: 'version_conflict'
  /** The version now stored (the one the caller's edit would overwrite). */
  currentVersion: number
  updatedAt: string
  /** Who saved the stored version, when known. */
  updatedBy: string | null
}

/** 200 of POST /api/drills/:id/archive and /restore. */
export interface DrillArchiveState { id: number, archivedAt: string | null }

/** GET /api/ensembles/:id/drills/defaults: where a new drill starts. */
export interface DrillDefaults {
  ensembleId: number
  ensembleName: string
  document: DrillDocument
}
