import { z } from 'zod'
import { userText } from './text'

/** Text fields of the drill import form (multipart), shared by the form and the route. */
export const DrillImportFields = z.object({
  title: userText(120, 0).optional(),
  /** Bars to keep, by the score's bar numbers: "3-6" or "4". */
  bars: z.string().trim().max(20).regex(/^$|^\d{1,5}\s*(?:[-–]\s*\d{1,5})?$/, 'Bars as a range such as 3-6').optional(),
  /** "1" or "true": parse and return the drill without saving it. */
  preview: z.enum(['0', '1', 'true', 'false']).optional(),
  /** JSON object renaming imported parts to section names: {"Women 1":"Soprano"}. */
  parts: z.string().max(8000).optional().transform((text, ctx) => {
    if (!text) return {}
    try {
      const value = JSON.parse(text) as unknown
      const parsed = z.record(z.string().max(60), z.string().trim().min(1, 'A part needs a name').max(60, 'A part name has at most 60 characters')).safeParse(value)
      if (parsed.success) return parsed.data
      ctx.addIssue({ code: 'custom', message: parsed.error.issues[0]?.message ?? 'Part names as {"imported name": "new name"}' })
    } catch {
      ctx.addIssue({ code: 'custom', message: 'Part names as a JSON object such as {"Women 1": "Soprano"}' })
    }
    return z.NEVER
  }),
})
export type DrillImportFields = z.input<typeof DrillImportFields>
