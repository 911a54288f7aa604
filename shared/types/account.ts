import type { PitchView } from '../schemas/account'

/** GET/PATCH /api/account: the signed-in person's own profile. */
export interface AccountProfile {
  id: number
  email: string
  name: string
  /** Instrument id from the tuning engine's list, or null. */
  instrument: string | null
  pitchView: PitchView
  siteAdmin: boolean
}
