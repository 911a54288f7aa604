import { z } from 'zod'
import { stripBidi } from '../text'

/**
 * Text a person types and others see again (names, titles, labels): bidirectional control
 * characters are dropped, then it is trimmed and its length checked.
 */
export function userText (max: number, min = 1) {
  return z.string().transform(stripBidi).pipe(z.string().trim().min(min).max(max))
}
