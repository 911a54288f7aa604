import type { SystemOptions } from '../drill/schema'
import { parseSystem } from '../drill/schema'
import { TuningError } from './errors'
import type { FixedTuning } from './fixed'
import { justTonic, meantone, pythagorean, scalaTuning } from './fixed'
import { pureRatio } from './just'
import { parseKey, parsePitchClass } from './pitch'
import { Ratio, toRatio } from './ratio'
import type { ScalaDegree } from './scala'
import { parseScala, toScala } from './scala'

const CHORD_ROOT_INTERVALS = ['2m', '2M', '3m', '3M', '4P', '4A', '5P', '6m', '6M', '7m', '7M']

/**
 * Writes any tuning system as a Scala .scl file of twelve pitches above the tonic. The chord-based
 * systems (just-root, just-common) have no fixed scale: they export the pure intervals they use above
 * a chord root (with the dominant seventh as chosen), which is what a keyboard retuned per chord plays.
 */
export function systemToScala(systemInput: Partial<SystemOptions> | SystemOptions, key = 'C major'): string {
  const system = parseSystem(systemInput)
  const k = parseKey(key)
  const tonic = system.tonic ? parsePitchClass(system.tonic, 'system.tonic') : k.tonic
  let description: string
  let degrees: ScalaDegree[]
  const fromFixed = (f: FixedTuning) => {
    description = f.description
    degrees = f.table!
  }
  switch (system.name) {
    case 'equal':
      description = 'Equal temperament, 12 equal semitones'
      degrees = [...Array.from({ length: 11 }, (_, i) => ({ cents: 100 * (i + 1), ratio: null })), { cents: 1200, ratio: Ratio.TWO }]
      break
    case 'just-root':
    case 'just-common':
      description = `Just intervals above a chord root (5-limit, dominant seventh ${system.seventh === 'harmonic' ? '7/4' : '16/9'})`
      degrees = [...CHORD_ROOT_INTERVALS.map(iv => {
        const ratio = pureRatio(iv, ['1P', '3M', '5P', '7m'], system.seventh)!
        return { cents: ratio.cents(), ratio }
      }), { cents: 1200, ratio: Ratio.TWO }]
      break
    case 'just-tonic': fromFixed(justTonic(tonic, k.mode)); break
    case 'pythagorean': fromFixed(pythagorean(tonic, { start: system.start, wolf: system.wolf, mode: k.mode })); break
    case 'meantone': fromFixed(meantone(tonic, toRatio(system.fraction), { start: system.start, wolf: system.wolf, mode: k.mode })); break
    case 'scala': {
      if (!system.scala) throw new TuningError('scala_missing', 'The scala system needs the text of a Scala .scl file', 'system.scala')
      const scale = parseScala(system.scala)
      const f = scalaTuning(tonic, scale)
      if (!f.table) return toScala(scale)
      fromFixed(f)
      break
    }
  }
  return toScala({ description: description!, degrees: degrees! })
}
