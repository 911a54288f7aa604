import { z } from 'zod'
import { stripBidi } from '../text'

/**
 * Text a person types and others see again (names, titles, labels): bidirectional control
 * characters are dropped, then it is trimmed and its length checked. `messages` words the length
 * checks for people (a field's own words win over the parse's general ones).
 */
export function userText (max: number, min = 1, messages: { min?: string, max?: string } = {}) {
  return z.string().transform(stripBidi).pipe(z.string().trim().min(min, messages.min).max(max, messages.max))
}
