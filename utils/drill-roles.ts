/** Whether a role from GET /api/ensembles may write drills (a site admin acts as director). */
export function directsEnsemble(role: string | null | undefined): boolean {
  return role === 'director' || role === 'admin'
}
