// The demo scenario: invented ensembles and people (addresses at example.org), for the demo only.
import type { DrillInput } from '../../shared/drill/schema'

/** The one password of every demo account (the README states it). */
export const DEMO_PASSWORD = 'drift-demo-2026'

export type DemoRole = 'director' | 'section_leader' | 'player'

export interface DemoPerson {
  key: string
  name: string
  email: string
  siteRole?: 'admin'
}

export interface DemoMember { person: string, role: DemoRole, section: string | null }

export interface DemoSection { name: string, instrument: string }

/** How a player deviates from the target, in cents (positive = sharp). */
export interface Deviation {
  /** Constant offset on every note. */
  offsetCents?: number
  /** Extra offset on notes that are this chord member (e.g. thirds sung high). */
  members?: Partial<Record<'root' | 'third' | 'fifth' | 'seventh', number>>
  /** Sagging (negative) or rising over the take, cents per second. */
  driftCentsPerS?: number
  /** Random scatter per hold, cents (standard deviation). */
  scatterCents?: number
  vibrato?: { rateHz: number, extentCents: number }
}

export interface DemoDrill {
  key: string
  ensemble: string
  document: DrillInput
}

export interface DemoAssignment {
  ensemble: string
  drill: string
  title: string
  instructions: string
  /** Days from the seed time (negative = overdue). */
  dueInDays: number
  section?: string
}

export interface DemoTake {
  person: string
  drill: string
  part: string
  /** Assignment index in ASSIGNMENTS, when the take answers one. */
  assignment?: number
  /** Days before the seed time. */
  daysAgo: number
  deviation: Deviation
  /** Seconds of count-in before the first note. */
  leadInS: number
}

export interface DemoEnsemble {
  key: string
  name: string
  kind: 'choir' | 'brass_band' | 'wind_band' | 'mixed'
  description: string
  a4: number
  sections: DemoSection[]
  members: DemoMember[]
}

const p = (key: string, name: string, siteRole?: 'admin'): DemoPerson => ({
  key,
  name,
  email: `${name.toLowerCase().replace(/[^a-z]+/g, '.').replace(/^\.|\.$/g, '')}@example.org`,
  siteRole,
})

export const PEOPLE: DemoPerson[] = [
  { key: 'admin', name: 'Robin Achterberg', email: 'admin@example.org', siteRole: 'admin' },
  p('helena', 'Helena Marsh'),
  p('owen', 'Owen Pryce'),
  p('aisha', 'Aisha Bello'),
  p('clara', 'Clara Lindqvist'),
  p('maya', 'Maya Chen'),
  p('priya', 'Priya Natarajan'),
  p('june', 'June Whitaker'),
  p('rosa', 'Rosa Delgado'),
  p('felix', 'Felix Ward'),
  p('daniel', 'Daniel Okoro'),
  p('tomas', 'Tomas Reyes'),
  p('graham', 'Graham Holt'),
  p('ike', 'Ike Mensah'),
  p('lena', 'Lena Fischer'),
  p('marcus', 'Marcus Doyle'),
  p('nadia', 'Nadia Petrova'),
  p('callum', 'Callum Reid'),
  p('ellie', 'Ellie Brooks'),
  p('wes', 'Wes Ogunleye'),
  p('hugo', 'Hugo Varga'),
]

export const ENSEMBLES: DemoEnsemble[] = [
  {
    key: 'choir',
    name: 'Driftwood Bay Community Choir',
    kind: 'choir',
    description: 'Forty-odd singers of the harbour town; Tuesday rehearsals in the old net loft.',
    a4: 440,
    sections: [
      { name: 'Soprano', instrument: 'voice-soprano' },
      { name: 'Alto', instrument: 'voice-alto' },
      { name: 'Tenor', instrument: 'voice-tenor' },
      { name: 'Bass', instrument: 'voice-bass' },
    ],
    members: [
      { person: 'helena', role: 'director', section: null },
      { person: 'aisha', role: 'section_leader', section: 'Soprano' },
      { person: 'clara', role: 'player', section: 'Soprano' },
      { person: 'maya', role: 'player', section: 'Soprano' },
      { person: 'priya', role: 'section_leader', section: 'Alto' },
      { person: 'june', role: 'player', section: 'Alto' },
      { person: 'rosa', role: 'player', section: 'Alto' },
      { person: 'felix', role: 'section_leader', section: 'Tenor' },
      { person: 'owen', role: 'player', section: 'Tenor' },
      { person: 'daniel', role: 'player', section: 'Tenor' },
      { person: 'tomas', role: 'section_leader', section: 'Bass' },
      { person: 'graham', role: 'player', section: 'Bass' },
      { person: 'ike', role: 'player', section: 'Bass' },
    ],
  },
  {
    key: 'brass',
    name: 'Copperfield Quarry Brass',
    kind: 'brass_band',
    description: 'A ten-piece brass ensemble from the quarry villages; treble-clef brass and concert-pitch trombone.',
    a4: 440,
    sections: [
      { name: 'Cornet', instrument: 'cornet-bb' },
      { name: 'Tenor Horn', instrument: 'tenor-horn-eb' },
      { name: 'Baritone', instrument: 'baritone-bb-treble' },
      { name: 'Euphonium', instrument: 'euphonium-bb-treble' },
      { name: 'Trombone', instrument: 'trombone' },
      { name: 'Eb Bass', instrument: 'eb-bass-treble' },
      { name: 'Bb Bass', instrument: 'bb-bass-treble' },
    ],
    members: [
      { person: 'owen', role: 'director', section: null },
      { person: 'lena', role: 'section_leader', section: 'Cornet' },
      { person: 'marcus', role: 'player', section: 'Cornet' },
      { person: 'nadia', role: 'player', section: 'Tenor Horn' },
      { person: 'callum', role: 'player', section: 'Baritone' },
      { person: 'ellie', role: 'section_leader', section: 'Euphonium' },
      { person: 'tomas', role: 'player', section: 'Trombone' },
      { person: 'wes', role: 'section_leader', section: 'Eb Bass' },
      { person: 'hugo', role: 'player', section: 'Bb Bass' },
    ],
  },
]

const SATB = [
  { name: 'Soprano', instrument: 'voice-soprano' },
  { name: 'Alto', instrument: 'voice-alto' },
  { name: 'Tenor', instrument: 'voice-tenor' },
  { name: 'Bass', instrument: 'voice-bass' },
]
const BRASS = [
  { name: 'Cornet', instrument: 'cornet-bb' },
  { name: 'Tenor Horn', instrument: 'tenor-horn-eb' },
  { name: 'Baritone', instrument: 'baritone-bb-treble' },
  { name: 'Euphonium', instrument: 'euphonium-bb-treble' },
  { name: 'Trombone', instrument: 'trombone' },
  { name: 'Eb Bass', instrument: 'eb-bass-treble' },
  { name: 'Bb Bass', instrument: 'bb-bass-treble' },
]
const satb = (s: string, a: string, t: string, b: string) => ({ Soprano: s, Alto: a, Tenor: t, Bass: b })
const brass = (...n: (string | null)[]) => Object.fromEntries(BRASS.map((part, i) => [part.name, n[i] ?? null]))

export const DRILLS: DemoDrill[] = [
  {
    key: 'cadence',
    ensemble: 'choir',
    document: {
      title: 'Held cadence in F: I–vi–ii–V–I',
      key: 'F major',
      tempo: 60,
      a4: 440,
      system: { name: 'just-common', seventh: 'harmonic', fraction: '1/4' },
      tolerance: 10,
      parts: SATB,
      chords: [
        { beats: 3, symbol: 'F', notes: satb('A4', 'F4', 'C4', 'F3') },
        { beats: 3, symbol: 'Dm', notes: satb('A4', 'F4', 'D4', 'D3') },
        { beats: 3, symbol: 'Gm', notes: satb('Bb4', 'G4', 'D4', 'G3') },
        { beats: 3, symbol: 'C', notes: satb('G4', 'E4', 'C4', 'C3') },
        { beats: 4, symbol: 'F', notes: satb('A4', 'F4', 'C4', 'F3') },
      ],
    },
  },
  {
    key: 'triad',
    ensemble: 'choir',
    document: {
      title: 'Held D major triad, pure from the root',
      key: 'D major',
      tempo: 60,
      a4: 440,
      system: { name: 'just-root', seventh: 'harmonic', fraction: '1/4' },
      tolerance: 8,
      parts: SATB,
      chords: [
        { beats: 5, symbol: 'D', notes: satb('F#4', 'D4', 'A3', 'D3') },
        { beats: 5, symbol: 'D', notes: satb('A4', 'F#4', 'D4', 'D3') },
      ],
    },
  },
  {
    key: 'chorale',
    ensemble: 'brass',
    document: {
      title: 'Chorale fragment in B♭',
      key: 'Bb major',
      tempo: 72,
      a4: 440,
      system: { name: 'equal', seventh: 'harmonic', fraction: '1/4' },
      tolerance: 10,
      parts: BRASS,
      chords: [
        { beats: 4, symbol: 'Bb', notes: brass('D5', 'Bb4', 'F4', 'D4', 'Bb3', 'D3', 'Bb2') },
        { beats: 4, symbol: 'Eb', notes: brass('Eb5', 'Bb4', 'G4', 'Eb4', 'G3', 'Eb3', 'Eb2') },
        { beats: 4, symbol: 'F7', notes: brass('C5', 'A4', 'F4', 'Eb4', 'A3', 'C3', 'F2') },
        { beats: 4, symbol: 'Bb', notes: brass('Bb4', 'F4', 'D4', 'Bb3', 'F3', 'D3', 'Bb2') },
      ],
    },
  },
  {
    key: 'longtones',
    ensemble: 'brass',
    document: {
      title: 'Long tones: B♭, F, B♭',
      key: 'Bb major',
      tempo: 60,
      a4: 440,
      system: { name: 'equal', seventh: 'harmonic', fraction: '1/4' },
      tolerance: 6,
      parts: BRASS,
      chords: [
        { beats: 4, notes: brass('Bb4', 'Bb4', 'Bb3', 'Bb3', 'Bb3', 'Bb2', 'Bb2') },
        { beats: 2, notes: brass() },
        { beats: 4, notes: brass('F5', 'F4', 'F4', 'F4', 'F3', 'F3', 'F2') },
        { beats: 2, notes: brass() },
        { beats: 4, notes: brass('Bb4', 'Bb4', 'Bb3', 'Bb3', 'Bb3', 'Bb2', 'Bb2') },
      ],
    },
  },
]

export const ASSIGNMENTS: DemoAssignment[] = [
  { ensemble: 'choir', drill: 'cadence', title: 'Cadence in F, chords held', instructions: 'Hold each chord for the full count; keep the shared notes exactly where they are.', dueInDays: 3 },
  { ensemble: 'choir', drill: 'triad', title: 'Pure D major triad', instructions: 'Listen for the beats to stop on the second chord.', dueInDays: -2 },
  { ensemble: 'choir', drill: 'triad', title: 'Altos: the third of D major', instructions: 'Altos, the F♯ in the second chord sits low in a pure triad; aim below your tuner.', dueInDays: 5, section: 'Alto' },
  { ensemble: 'brass', drill: 'chorale', title: 'Chorale fragment, full tone', instructions: 'Concert B♭; play your written part, full tone, no vibrato.', dueInDays: 4 },
  { ensemble: 'brass', drill: 'longtones', title: 'Long tones, daily', instructions: 'Steady air; do not let the pitch fall at the end of each note.', dueInDays: 6 },
]

const VOICE_VIBRATO = { rateHz: 5.3, extentCents: 14 }

export const TAKES: DemoTake[] = [
  // The alto whose thirds are high: about +9 cents on every third, in tune elsewhere.
  { person: 'june', drill: 'cadence', part: 'Alto', assignment: 0, daysAgo: 1, leadInS: 1.2, deviation: { offsetCents: 1, members: { third: 9 }, scatterCents: 2, vibrato: VOICE_VIBRATO } },
  { person: 'june', drill: 'cadence', part: 'Alto', daysAgo: 9, leadInS: 0.8, deviation: { offsetCents: 2, members: { third: 13 }, scatterCents: 3, vibrato: VOICE_VIBRATO } },
  { person: 'rosa', drill: 'cadence', part: 'Alto', assignment: 0, daysAgo: 2, leadInS: 1.0, deviation: { offsetCents: -2, scatterCents: 3, vibrato: VOICE_VIBRATO } },
  { person: 'clara', drill: 'cadence', part: 'Soprano', assignment: 0, daysAgo: 1, leadInS: 1.5, deviation: { offsetCents: 1.5, scatterCents: 2.5, vibrato: { rateHz: 5.6, extentCents: 20 } } },
  { person: 'felix', drill: 'cadence', part: 'Tenor', assignment: 0, daysAgo: 3, leadInS: 0.9, deviation: { offsetCents: 0, scatterCents: 2, vibrato: VOICE_VIBRATO } },
  // The bass section sags flat over the take.
  { person: 'ike', drill: 'cadence', part: 'Bass', assignment: 0, daysAgo: 1, leadInS: 1.1, deviation: { offsetCents: -2, driftCentsPerS: -1.3, scatterCents: 2, vibrato: VOICE_VIBRATO } },
  { person: 'graham', drill: 'cadence', part: 'Bass', assignment: 0, daysAgo: 2, leadInS: 1.3, deviation: { offsetCents: -1, driftCentsPerS: -0.9, scatterCents: 2.5, vibrato: VOICE_VIBRATO } },
  { person: 'priya', drill: 'triad', part: 'Alto', assignment: 1, daysAgo: 3, leadInS: 1.0, deviation: { offsetCents: 0.5, members: { third: 3 }, scatterCents: 1.5, vibrato: VOICE_VIBRATO } },
  { person: 'maya', drill: 'triad', part: 'Soprano', assignment: 1, daysAgo: 4, leadInS: 1.4, deviation: { offsetCents: 4, members: { third: 12 }, scatterCents: 2, vibrato: { rateHz: 5.8, extentCents: 22 } } },
  // The sharp cornet.
  { person: 'marcus', drill: 'chorale', part: 'Cornet', assignment: 3, daysAgo: 1, leadInS: 1.0, deviation: { offsetCents: 12, scatterCents: 3 } },
  { person: 'lena', drill: 'chorale', part: 'Cornet', assignment: 3, daysAgo: 2, leadInS: 0.9, deviation: { offsetCents: 2, scatterCents: 2 } },
  { person: 'nadia', drill: 'chorale', part: 'Tenor Horn', assignment: 3, daysAgo: 2, leadInS: 1.2, deviation: { offsetCents: -4, scatterCents: 3 } },
  { person: 'tomas', drill: 'chorale', part: 'Trombone', assignment: 3, daysAgo: 1, leadInS: 1.1, deviation: { offsetCents: 1, members: { third: -6 }, scatterCents: 2 } },
  { person: 'hugo', drill: 'chorale', part: 'Bb Bass', assignment: 3, daysAgo: 3, leadInS: 1.0, deviation: { offsetCents: -3, driftCentsPerS: -0.8, scatterCents: 3 } },
  { person: 'wes', drill: 'longtones', part: 'Eb Bass', assignment: 4, daysAgo: 1, leadInS: 1.0, deviation: { offsetCents: -1, driftCentsPerS: -0.4, scatterCents: 1.5 } },
  { person: 'ellie', drill: 'longtones', part: 'Euphonium', assignment: 4, daysAgo: 2, leadInS: 0.8, deviation: { offsetCents: 2, scatterCents: 1.5 } },
]

/** One review, so the review pages have something on first start. */
export const REVIEWS = [
  { take: 2, reviewer: 'priya', verdict: 'needs_work' as const, summary: 'Good breath support; the sustained notes wander a little.', notes: [{ holdIndex: 1, body: 'The F above D minor dips towards the end: keep the air going.' }] },
]
