// The decoder is one reader per container format behind a small dispatcher, so a change to one
// format's reader cannot disturb another's (the files named here are what the contributor guide lists).
import { readdirSync, readFileSync } from 'node:fs'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'

const dir = join(__dirname, '../../../server/analysis')

describe('decoder layout', () => {
  it('has one reader per container format', () => {
    const files = readdirSync(join(dir, 'formats')).sort()
    expect(files).toEqual(['common.ts', 'flac.ts', 'matroska.ts', 'mp3.ts', 'mp4.ts', 'ogg.ts', 'opus.ts', 'wav.ts'])
  })

  it('keeps decode.ts a dispatcher and every reader under 300 lines', () => {
    const lines = (p: string) => readFileSync(p, 'utf8').split('\n').length
    expect(lines(join(dir, 'decode.ts'))).toBeLessThan(200)
    for (const f of readdirSync(join(dir, 'formats'))) expect(lines(join(dir, 'formats', f)), f).toBeLessThan(300)
  })
})
