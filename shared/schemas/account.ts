import { z } from 'zod'
import { INSTRUMENTS } from '../tuning/transpose'
import { PASSWORD_MIN } from './auth'

// Bodies of the account routes, shared with the account page's forms.

/** How a player reads notes: as they sound, or as written for their instrument. */
export const PITCH_VIEWS = ['concert', 'written'] as const
export type PitchView = typeof PITCH_VIEWS[number]

export const NAME_MAX = 120

/** A person's display name: trimmed, 1–120 characters, no control characters. */
export const PersonName = z.string()
  .transform(s => s.replace(/[\u202A-\u202E\u2066-\u2069]/g, '').trim())
  .pipe(z.string()
    .min(1, 'Enter your name')
    .max(NAME_MAX, `Use at most ${NAME_MAX} characters`)
    // eslint-disable-next-line no-control-regex
    .refine(s => !/[\u0000-\u001F\u007F]/.test(s), 'Use letters, spaces and punctuation only'))

/** An instrument id the tuning engine knows (it gives the transposition), or null for none. */
export const InstrumentId = z.string().refine(id => Object.hasOwn(INSTRUMENTS, id), 'Choose an instrument from the list')

/** PATCH /api/account: any of the fields. */
export const ProfileBody = z.object({
  name: PersonName.optional(),
  instrument: InstrumentId.nullable().optional(),
  pitchView: z.enum(PITCH_VIEWS, 'Choose concert or written pitch').optional(),
}).strict().refine(b => Object.keys(b).length > 0, 'Change at least one field')
export type ProfileBody = z.infer<typeof ProfileBody>

/** POST /api/account/password */
export const PasswordChangeBody = z.object({
  currentPassword: z.string().min(1, 'Enter your current password').max(200),
  newPassword: z.string().min(PASSWORD_MIN, `Use at least ${PASSWORD_MIN} characters`).max(200, 'That password is too long'),
}).strict()
export type PasswordChangeBody = z.infer<typeof PasswordChangeBody>
