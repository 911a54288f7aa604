// The signed-in user and ensemble roles, as the server sends them and the pages read them.

/** A member's role in one ensemble (a director may do what a section leader may, who may do what a player may). */
export type EnsembleRole = 'director' | 'section_leader' | 'player'

/** The signed-in user as the server keeps it in the session (GET /api/home `user`, the session cookie). */
export interface SessionUser {
  id: number
  email: string
  name: string
  siteRole: 'admin' | null
}
