import { z } from 'zod'

// Form bodies shared by the sign-in pages and the auth routes: one validation on both sides.

/** POST /api/auth/login */
export const LoginBody = z.object({
  email: z.string().trim().toLowerCase().email(),
  password: z.string().min(1).max(200),
})
export type LoginBody = z.infer<typeof LoginBody>

/** POST /api/auth/password-reset */
export const PasswordResetBody = z.object({
  email: z.string().trim().toLowerCase().email(),
})
export type PasswordResetBody = z.infer<typeof PasswordResetBody>

/** Shortest new password we accept. */
export const PASSWORD_MIN = 8

/** POST /api/auth/password-reset/confirm */
export const PasswordResetConfirmBody = z.object({
  token: z.string().min(1).max(500),
  password: z.string().min(PASSWORD_MIN).max(200),
})
export type PasswordResetConfirmBody = z.infer<typeof PasswordResetConfirmBody>
