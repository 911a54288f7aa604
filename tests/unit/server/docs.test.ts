// The contributor guide and the README say what the code does: the formats the analysis reads
// and where navigation and public pages are decided.
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import { AUDIO_MIME } from '../../../server/utils/audio-sniff'

const root = join(import.meta.dirname, '../../..')
const read = (p: string) => readFileSync(join(root, p), 'utf8')

// How each container the decoder sniffs is named in prose (common practice for these formats).
const NAMES: Record<keyof typeof AUDIO_MIME, string> = {
  'wav': 'WAV', 'flac': 'FLAC', 'mp3': 'MP3', 'ogg-vorbis': 'Ogg Vorbis', 'ogg-opus': 'Ogg Opus', 'webm-opus': 'WebM/Opus', 'mp4-aac': 'MP4/AAC',
}

describe('the formats `driftline analyze` reads', () => {
  it('are every format the decoder sniffs, in the README and in the command\'s help', () => {
    const readme = read('README.md').replace(/\s+/g, ' ')
    const sentence = /`analyze` measures a take \(([^)]*)\)/.exec(readme)?.[1] ?? ''
    const help = /--audio FILE\s+the take: ([^\n]*)/.exec(read('cli/analyze.ts'))?.[1] ?? ''
    for (const name of Object.values(NAMES)) {
      expect(sentence).toContain(name)
      expect(help).toContain(name)
    }
    expect(Object.keys(NAMES).sort()).toEqual(Object.keys(AUDIO_MIME).sort())
  })
})

describe('DEVELOPERS.md', () => {
  const guide = read('DEVELOPERS.md')
  it('names the file navigation lives in, and that file holds the entries', () => {
    expect(guide).toContain('composables/useNavItems.ts')
    expect(read('composables/useNavItems.ts')).toMatch(/const ENTRIES: NavEntry\[\] = \[/)
  })
  it('says a page becomes public through its page meta, which the guard reads', () => {
    expect(guide).toContain('definePageMeta({ public: true })')
    expect(read('middleware/auth.global.ts')).toContain('to.meta.public')
    expect(read('pages/login.vue')).toMatch(/definePageMeta\(\{[^}]*public: true/)
  })
})
