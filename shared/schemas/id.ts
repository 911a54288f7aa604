import { z } from 'zod'

/**
 * A record id: a positive whole number, written in plain decimal when it comes as text (a path
 * segment, a query or form field). " 1", "01", "+1", "1.0", "1e1" and "0x10" are refused rather
 * than read as some other id. JSON numbers are taken as they are.
 */
export const Id = z.union([
  z.number().int().positive().max(Number.MAX_SAFE_INTEGER),
  z.string().regex(/^[1-9][0-9]{0,15}$/, 'a positive whole number such as 12').transform(Number)
    .refine(n => Number.isSafeInteger(n), 'a positive whole number such as 12'),
])

/** An id that may be left out of a form: an empty field counts as missing. */
export const OptionalId = z.union([z.literal('').transform(() => undefined), Id]).optional()
