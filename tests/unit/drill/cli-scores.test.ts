import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import { run } from '../../../cli/targets'

const SCORES = new URL('../../fixtures/musicxml/', import.meta.url).pathname

async function cli(...argv: string[]) {
  let stdout = ''
  let stderr = ''
  const code = await run(argv, { stdout: s => { stdout += s }, stderr: s => { stderr += s } })
  return { code, stdout, stderr }
}

describe('driftline targets --drill reads MusicXML', () => {
  it.each(['closed-score-hymn.musicxml', 'closed-score-hymn.mxl'])('%s: four parts from two staves, targets in just intonation from each root', async (name) => {
    const { code, stdout, stderr } = await cli('--drill', `${SCORES}${name}`, '--system', 'just-root', '--json')
    expect(stderr).toBe('')
    expect(code).toBe(0)
    const out = JSON.parse(stdout)
    expect(out.chords).toHaveLength(6)
    const first = out.chords[0].notes
    expect(first.map((n: { part: string }) => n.part)).toEqual(['Soprano', 'Alto', 'Tenor', 'Bass'])
    // B-flat major from its root: the soprano's D5 is the pure major third, two octaves above the bass's
    // B-flat 2 (ratio 5/1 = 4 · 5/4, common practice), 13.69 cents below equal temperament
    // (1200·log2(5/4) − 400 = −13.686).
    const third = first.find((n: { part: string }) => n.part === 'Soprano')
    expect(third).toMatchObject({ note: 'D5', member: 'third', ratio: '5/1' })
    expect(third.centsFromEqual).toBeCloseTo(-13.686, 3)
  })

  it('a file that is not XML exits 1 with a message naming the line', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'driftline-cli-'))
    const broken = join(dir, 'broken.musicxml')
    writeFileSync(broken, '<score-partwise>\n<part-list>\n</score-partwise>\n')
    const { code, stdout, stderr } = await cli('--drill', broken, '--system', 'equal')
    rmSync(dir, { recursive: true, force: true })
    expect(code).toBe(1)
    expect(stdout).toBe('')
    expect(stderr).toMatch(/^driftline targets: The file is not well-formed XML: line \d+: /)
  })
})
