import { describe, expect, it } from 'vitest'
import { auditActionLabel, auditChanges, auditFamilies, auditValue } from '../../../utils/audit'

describe('audit words', () => {
  it('names known actions and makes unknown ones readable', () => {
    expect(auditActionLabel('user.disabled')).toBe('Disabled an account')
    expect(auditActionLabel('section.merged_into')).toBe('Section merged into')
    expect(auditActionLabel('')).toBe('Unnamed action')
  })

  it('groups actions by family', () => {
    expect(auditFamilies(['user.disabled', 'auth.login', 'user.restored'])).toEqual(['auth', 'user'])
  })

  it('writes values without internals', () => {
    expect(auditValue(true)).toBe('yes')
    expect(auditValue(null)).toBe('none')
    expect(auditValue(Number.NaN)).toBe('none')
    expect(auditValue({ pitchView: 'written', a4: 442 })).toBe('reads written; A4 442')
    for (const v of [undefined, {}, [], [{ a: 1 }], { nested: { x: null } }]) {
      expect(auditValue(v)).not.toMatch(/undefined|\[object Object\]/)
    }
  })

  it('lists one line per changed field', () => {
    expect(auditChanges({ disabled: false }, { disabled: true })).toEqual([{ field: 'disabled', before: 'no', after: 'yes' }])
    expect(auditChanges(null, { name: 'Tidewater', kind: 'choir' })).toEqual([
      { field: 'name', before: null, after: 'Tidewater' }, { field: 'kind', before: null, after: 'choir' },
    ])
    expect(auditChanges(null, null)).toEqual([])
  })
})
