// Ids in paths and forms, and user text shown back: bidirectional controls, plain issue messages.
import { describe, expect, it } from 'vitest'
import { z } from 'zod'
import { Id, OptionalId } from '../../../shared/schemas/id'
import { userText } from '../../../shared/schemas/text'
import { cleanFileName, describeValue, hasBidi, jsonErrorOffset, jsonErrorPlace, plainIssueMessage, stripBidi } from '../../../shared/text'

describe('Id', () => {
  it.each([['1', 1], ['12', 12], ['9007199254740991', 9007199254740991], [7, 7]])('accepts %j', (input, want) => {
    expect(Id.parse(input)).toBe(want)
  })
  // JavaScript's Number() reads "0x10" as 16, "1e1" as 10 and " 1" as 1 (ECMAScript StringToNumber,
  // ECMA-262 §7.1.4.1.1); each of these would reach some other record if coerced.
  it.each([' 1', '1 ', '01', '+1', '1.0', '1e1', '0x10', '0', '-1', '', '1,2', '9007199254740993', '１', 1.5, 0, -3, '12abc'])('refuses %j', (input) => {
    expect(Id.safeParse(input).success).toBe(false)
  })
  it('takes an empty form field as missing', () => {
    expect(z.object({ a: OptionalId }).parse({ a: '' })).toEqual({ a: undefined })
    expect(z.object({ a: OptionalId }).parse({})).toEqual({})
  })
})

// The characters are Unicode's explicit directional embeddings, overrides and isolates
// (Unicode Standard Annex #9, "Explicit Directional Formatting Characters"): LRE U+202A,
// RLE U+202B, PDF U+202C, LRO U+202D, RLO U+202E, LRI U+2066, RLI U+2067, FSI U+2068, PDI U+2069.
describe('bidirectional controls', () => {
  const all = '\u202A\u202B\u202C\u202D\u202E\u2066\u2067\u2068\u2069'
  it('strips every embedding, override and isolate control, and nothing else', () => {
    expect(stripBidi(`a${all}b`)).toBe('ab')
    expect(hasBidi(all[4]!)).toBe(true)
    // Marks that only hint direction (LRM U+200E, RLM U+200F) and right-to-left letters stay.
    expect(stripBidi('שלום \u200F Ωmega café')).toBe('שלום \u200F Ωmega café')
  })
  it('cleans a file name that an override would show reversed', () => {
    // "take-\u202Egnp.wav" is drawn as "take-vaw.png"
    expect(cleanFileName('take-\u202Egnp.wav')).toBe('take-gnp.wav')
    expect(cleanFileName('C:\\Users\\x\\alto\u2066.wav')).toBe('alto.wav')
    expect(cleanFileName('\u202E')).toBeNull()
  })
  it('userText drops the controls before trimming and checking the length', () => {
    const Title = userText(10)
    expect(Title.parse('  Warm\u202Eup  ')).toBe('Warmup')
    expect(Title.safeParse('\u202E\u2066').success).toBe(false)
  })
})

describe('plain messages for bad values', () => {
  it('never names a value "[object Object]" or "undefined"', () => {
    expect(describeValue({ a: 1 })).toBe('an object')
    expect(describeValue(['C4'])).toBe('a list')
    expect(describeValue(undefined)).toBe('nothing')
    expect(describeValue('Bb3')).toBe('"Bb3"')
  })
  it('words zod issues without JavaScript type names', () => {
    const S = z.object({ beats: z.number(), name: z.string().min(2), kind: z.enum(['a', 'b']) })
    const r = S.safeParse({ name: { x: 1 }, kind: 'c' }, { error: plainIssueMessage })
    expect(r.success).toBe(false)
    const messages = r.error!.issues.map(i => i.message)
    expect(messages).toEqual(['required', 'expected text, found an object', 'must be one of "a", "b"'])
    for (const m of messages) expect(m).not.toMatch(/undefined|\[object Object\]|received/)
    expect(z.string().min(2).safeParse('x', { error: plainIssueMessage }).error!.issues[0]!.message).toBe('must be at least 2 characters')
  })
  it('places a JSON syntax error by line and column', () => {
    expect(jsonErrorPlace('{\n  "title": "A",\n  "tempo": ,\n}')).toBe('line 3, column 12')
    expect(jsonErrorPlace('{"a":1')).toBe('line 1, column 7')
    expect(jsonErrorPlace('{"a":1}')).toBeNull()
  })

  // Valid and invalid texts from RFC 8259 §2–§7 (structure, numbers, strings), common practice;
  // each answer agrees with JSON.parse on whether the text is JSON.
  it.each([
    '{}', '[]', '"x"', '-0', '1.5e-3', '[1, "a\\u00e9", true, false, null, {"k": [ ]}]', ' {"a" : {"b" : [1,2]}} ',
    '{a:1}', '[1,]', '01', '1.', '.5', '"\t"', '"\\x"', 'tru', '{"a":1}}', '', '[1 2]', '+1', 'NaN',
  ])('%j', (text) => {
    let valid = true
    try { JSON.parse(text) } catch { valid = false }
    expect(jsonErrorOffset(text) === null).toBe(valid)
  })
})
