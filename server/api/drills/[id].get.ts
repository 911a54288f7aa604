import { z } from 'zod'
import { computeTargets } from '../../../shared/tuning/index'
import type { DrillView } from '../../../shared/types/drill-view'
import { Id } from '../../../shared/schemas/id'

const Query = z.object({ assignmentId: Id.optional() })

// GET /api/drills/:id → { id, version, archivedAt, updatedAt, ensembleId, ensembleName, role, document, targets, preselectedPart,
// openAssignments (the caller's, each with its part), limits (of a take upload) }
export default defineEventHandler(async (event): Promise<DrillView> => {
  const user = await requireUser(event)
  const { id } = validateParams(event, IdParams)
  const { assignmentId } = validateQuery(event, Query)
  const db = useDb()
  const access = await findDrillForUser(db, user, id)
  if (!access) throw apiError(404, 'not_found', 'Drill not found')
  const { drill } = access
  let targets = null
  let targetsError = null
  try {
    targets = computeTargets(drill.document)
  } catch (err) {
    const e = err as { name?: string, code?: string, message?: string }
    if (e?.name !== 'TuningError') throw err
    targetsError = { code: e.code ?? 'invalid_system', message: e.message ?? 'Targets cannot be computed' }
  }
  return {
    id: drill.id,
    version: drill.version,
    archivedAt: drill.archivedAt,
    updatedAt: drill.updatedAt,
    ensembleId: drill.ensembleId,
    ensembleName: access.ensembleName,
    role: access.membership.role,
    document: drill.document,
    targets,
    targetsError,
    preselectedPart: await preselectedPart(db, access, assignmentId),
    openAssignments: await openAssignmentsFor(db, user.id, drill.id),
    limits: takeUploadLimits(),
  }
})
