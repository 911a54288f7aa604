// Words for tuning systems and note names, as the drill and take screens show them.
import type { SystemName, SystemOptions } from '#shared/drill/schema'

/** Human names of the tuning systems (ours; the maths is the trade's). */
export const SYSTEM_LABELS: Record<SystemName, string> = {
  'equal': 'Equal temperament',
  'just-root': 'Just, from each chord root',
  'just-tonic': 'Just, from the tonic',
  'just-common': 'Just, common tones held',
  'pythagorean': 'Pythagorean',
  'meantone': 'Meantone',
  'scala': 'Scala scale',
}

/** A short description of a system with the options that matter to it. */
export function describeSystem(system: SystemOptions | SystemName | string | null | undefined): string {
  if (!system) return 'Unknown system'
  if (typeof system === 'string') return SYSTEM_LABELS[system as SystemName] ?? system
  const base = SYSTEM_LABELS[system.name] ?? system.name
  switch (system.name) {
    case 'just-root':
    case 'just-common':
      return `${base} (${system.seventh === '5-limit' ? '5-limit sevenths' : 'harmonic sevenths'})`
    case 'just-tonic':
      return system.tonic ? `${base} ${system.tonic}` : base
    case 'pythagorean':
      return [base, system.start && `from ${system.start}`, system.wolf && `wolf above ${system.wolf}`].filter(Boolean).join(', ')
    case 'meantone':
      return `${String(system.fraction ?? '1/4').replace(/\s+/g, '')}-comma ${base.toLowerCase()}`
    default:
      return base
  }
}

/**
 * The system a take report was scored in, with its options: the report's own when it carries
 * them; else the drill's when the names agree (or the report names none); else the named system
 * with default options.
 */
export function reportSystemOptions(reported: SystemOptions | string | null | undefined, drill: SystemOptions | null | undefined): SystemOptions {
  if (reported && typeof reported === 'object') return reported
  if (drill && (!reported || reported === drill.name)) return drill
  if (typeof reported === 'string' && reported in SYSTEM_LABELS) return { name: reported as SystemName, seventh: 'harmonic', fraction: '1/4' }
  return drill ?? { name: 'equal', seventh: 'harmonic', fraction: '1/4' }
}

const ACCIDENTALS: Record<string, string> = { 'bb': '𝄫', 'b': '♭', '#': '♯', '##': '𝄪', 'x': '𝄪', '': '' }

/** A note name with real accidentals for display: "Bb3" → "B♭3", "F#4" → "F♯4"; anything else unchanged. */
export function prettyNote(name: string | null | undefined): string {
  if (!name) return '—'
  const m = /^([A-Ga-g])(bb|b|##|#|x)?(-?\d+)?$/.exec(name.trim())
  if (!m) return name
  return `${m[1]!.toUpperCase()}${ACCIDENTALS[m[2] ?? '']}${m[3] ?? ''}`
}

