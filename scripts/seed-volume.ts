// `npm run seed:volume`: a large ensemble for the charts benchmark, written into the database of
// NUXT_DB_FILE (the same setting the server reads), migrated first. 80 players in 8 sections, 300
// analysed takes each (8–16 holds) spread over a year. No audio is made or analysed: each take gets
// a stored measurement (what the engine would have measured) built from the drill's targets with a
// player's habits, and is scored by the real scorer, so re-scoring under another system works.
// Invented people and ensemble, for the benchmark only. Sign in as volume.director@example.org
// with the demo password.
import { randomUUID } from 'node:crypto'
import { Chord, Note } from '@tonaljs/tonal'
import { Hash } from '@adonisjs/hash'
import { Scrypt } from '@adonisjs/hash/drivers/scrypt'
import { createKnex, DEFAULT_DB_FILE } from '../server/database/knex'
import { migrateLatest } from '../server/database/migrations'
import { saveDrill } from '../server/utils/drills'
import { scoreMeasurement } from '../server/analysis/score'
import { mulberry32 } from '../server/analysis/synth'
import { ENGINE_VERSION, type MeasuredHold, type Measurement } from '../server/analysis/types'
import { computeTargets } from '../shared/tuning/index'
import type { DrillInput, SystemOptions } from '../shared/drill/schema'
import { DEMO_PASSWORD } from '../seeds/demo/scenario'

export const VOLUME_DIRECTOR = 'volume.director@example.org'
const SECTIONS = ['Soprano 1', 'Soprano 2', 'Alto 1', 'Alto 2', 'Tenor 1', 'Tenor 2', 'Bass 1', 'Bass 2']
const VOICE_OF: Record<string, 'S' | 'A' | 'T' | 'B'> = { 'Soprano 1': 'S', 'Soprano 2': 'S', 'Alto 1': 'A', 'Alto 2': 'A', 'Tenor 1': 'T', 'Tenor 2': 'T', 'Bass 1': 'B', 'Bass 2': 'B' }
const FIRST = ['Aino', 'Bram', 'Cleo', 'Dario', 'Esme', 'Femke', 'Gideon', 'Hana', 'Ivo', 'Jora', 'Kasimir', 'Liese', 'Milo', 'Nela', 'Orrin', 'Pia', 'Quill', 'Rosalind', 'Sten', 'Tilde']
const LAST = ['Abernathy', 'Brightwater', 'Castellane', 'Dunmore', 'Ellery', 'Fairclough', 'Greythorn', 'Halloran', 'Ingleby', 'Jessop', 'Kettering', 'Larkspur', 'Merriweather', 'Northcote', 'Oakhurst', 'Penhallow']

interface DrillPlan { title: string, key: string, tempo: number, system: Partial<SystemOptions>, chords: string[] }
const DRILLS: DrillPlan[] = [
  { title: 'Cadence ladder in G', key: 'G major', tempo: 60, system: { name: 'just-root' }, chords: ['G', 'C', 'D', 'G', 'Em', 'Am', 'D7', 'G'] },
  { title: 'Comma walk in F', key: 'F major', tempo: 66, system: { name: 'just-common' }, chords: ['F', 'Dm', 'Gm', 'C', 'F', 'Bb', 'C7', 'F', 'Dm', 'Gm'] },
  { title: 'Minor chorale phrase', key: 'D minor', tempo: 56, system: { name: 'just-root' }, chords: ['Dm', 'Gm', 'A', 'Dm', 'Bb', 'Gm', 'A7', 'Dm', 'F', 'C', 'Dm', 'A'] },
  { title: 'Meantone hymn in B flat', key: 'Bb major', tempo: 63, system: { name: 'meantone', fraction: '1/4' }, chords: ['Bb', 'Eb', 'F', 'Bb', 'Gm', 'Cm', 'F7', 'Bb', 'Eb', 'Bb', 'F', 'Gm', 'Eb', 'F', 'F7', 'Bb'] },
  { title: 'Open fifths, Pythagorean', key: 'C major', tempo: 60, system: { name: 'pythagorean' }, chords: ['C5', 'G5', 'D5', 'A5', 'F5', 'C5', 'G5', 'C5', 'C5'] },
  { title: 'Equal-tempered warm-up', key: 'E major', tempo: 72, system: { name: 'equal' }, chords: ['E', 'A', 'B', 'E', 'C#m', 'F#m', 'B7', 'E', 'A', 'B7', 'E'] },
]

const RANGES = { B: [40, 55], T: [48, 67], A: [55, 74], S: [60, 79] } as const

/** SATB voicings of chord symbols with smooth voice leading (demo material, not a check value). */
export function voiceChords(symbols: string[]): Array<Record<'S' | 'A' | 'T' | 'B', string>> {
  let prev: number[] | null = null
  return symbols.map((sym) => {
    const notes = Chord.get(sym).notes
    if (!notes.length) throw new Error(`unknown chord ${sym}`)
    const pcs = notes.map(n => Note.chroma(n)!)
    const spell = (midi: number) => {
      const name = notes[pcs.indexOf(midi % 12)]!
      for (const oct of [Math.floor(midi / 12) - 1, Math.floor(midi / 12) - 2, Math.floor(midi / 12)]) {
        if (Note.midi(`${name}${oct}`) === midi) return `${name}${oct}`
      }
      throw new Error(`cannot spell ${midi} in ${sym}`)
    }
    const cands = (v: keyof typeof RANGES, allowed: number[]) => {
      const out: number[] = []
      for (let m = RANGES[v][0]; m <= RANGES[v][1]; m++) if (allowed.includes(m % 12)) out.push(m)
      return out
    }
    const bassPc = pcs[0]!
    let best: number[] | null = null
    let bestCost = Infinity
    for (const b of cands('B', [bassPc])) {
      for (const t of cands('T', pcs)) {
        for (const a of cands('A', pcs)) {
          if (a <= t || a - t > 12) continue
          for (const s of cands('S', pcs)) {
            if (s <= a || s - a > 12 || t <= b) continue
            const set = new Set([b, t, a, s].map(m => m % 12))
            const needed = pcs.slice(0, Math.min(pcs.length, 3)).concat(pcs.length > 3 ? [pcs[3]!] : [])
            if (!needed.every(pc => set.has(pc) || (pc === pcs[2] && pcs.length > 3))) continue
            const v = [s, a, t, b]
            const cost = prev ? v.reduce((sum, m, i) => sum + Math.abs(m - prev![i]!), 0) : Math.abs(s - 67) + Math.abs(a - 62) + Math.abs(t - 55) + Math.abs(b - 45)
            if (cost < bestCost) { bestCost = cost; best = v }
          }
        }
      }
    }
    if (!best) throw new Error(`no voicing for ${sym}`)
    prev = best
    return { S: spell(best[0]!), A: spell(best[1]!), T: spell(best[2]!), B: spell(best[3]!) }
  })
}

function drillDocument(plan: DrillPlan): DrillInput {
  const voiced = voiceChords(plan.chords)
  return {
    title: plan.title,
    key: plan.key,
    tempo: plan.tempo,
    a4: 440,
    tolerance: 10,
    system: plan.system as SystemOptions,
    parts: SECTIONS.map(name => ({ name, instrument: `voice-${({ S: 'soprano', A: 'alto', T: 'tenor', B: 'bass' } as const)[VOICE_OF[name]!]}` })),
    chords: voiced.map((v, i) => ({
      beats: i === voiced.length - 1 ? 4 : 2,
      symbol: plan.chords[i]!.replace(/5$/, ''),
      notes: Object.fromEntries(SECTIONS.map(name => [name, v[VOICE_OF[name]!]])),
    })),
  }
}

export interface VolumeOptions { file?: string, players?: number, takesPerPlayer?: number, log?: (m: string) => void, now?: Date }

/** Seeds the volume ensemble; returns null when it is already there. */
export async function seedVolume(o: VolumeOptions = {}) {
  const file = o.file ?? process.env.NUXT_DB_FILE ?? DEFAULT_DB_FILE
  const players = o.players ?? 80
  const perPlayer = o.takesPerPlayer ?? 300
  const log = o.log ?? (() => {})
  const now = o.now ?? new Date()
  const t0 = performance.now()
  const db = createKnex(file)
  try {
    await migrateLatest(db)
    if (await db('users').where({ email: VOLUME_DIRECTOR }).first('id')) return null
    const hash = await new Hash(new Scrypt({})).make(DEMO_PASSWORD)
    const rand = mulberry32(20261202)
    const normal = () => Math.sqrt(-2 * Math.log(1 - rand())) * Math.cos(2 * Math.PI * rand())

    const [directorId] = (await db('users').insert({ email: VOLUME_DIRECTOR, name: 'Wilhelmina Strand', password_hash: hash }).returning('id')).map(r => (typeof r === 'object' ? r.id : r))
    const [ensembleId] = (await db('ensembles').insert({ name: 'Lantern Bay Festival Chorus', kind: 'choir', a4: 440, tolerance: 10, default_system: JSON.stringify({ name: 'just-root', seventh: 'harmonic', fraction: '1/4' }), created_by: directorId }).returning('id')).map(r => (typeof r === 'object' ? r.id : r))
    await db('memberships').insert({ ensemble_id: ensembleId, user_id: directorId, role: 'director' })
    const sectionIds: number[] = []
    for (const [i, name] of SECTIONS.entries()) {
      const [row] = await db('sections').insert({ ensemble_id: ensembleId, name, position: i }).returning('id')
      sectionIds.push(typeof row === 'object' ? row.id : row)
    }
    const people: Array<{ id: number, section: string, bias: number, thirds: number, scatter: number, improve: number }> = []
    for (let i = 0; i < players; i++) {
      const section = SECTIONS[i % SECTIONS.length]!
      const name = `${FIRST[i % FIRST.length]} ${LAST[(i * 7 + Math.floor(i / FIRST.length)) % LAST.length]}`
      const email = `volume.singer${String(i + 1).padStart(2, '0')}@example.org`
      const [row] = await db('users').insert({ email, name, password_hash: hash }).returning('id')
      const id = typeof row === 'object' ? row.id : row
      // Section leaders: the first singer of each section.
      await db('memberships').insert({ ensemble_id: ensembleId, user_id: id, role: i < SECTIONS.length ? 'section_leader' : 'player', section_id: sectionIds[i % SECTIONS.length] })
      people.push({ id, section, bias: normal() * 5, thirds: 4 + normal() * 4, scatter: 3 + rand() * 6, improve: rand() * 6 })
    }
    const drills: Array<{ id: number, version: number, plan: DrillPlan, doc: DrillInput, targets: ReturnType<typeof computeTargets> }> = []
    for (const plan of DRILLS) {
      const doc = drillDocument(plan)
      const saved = await saveDrill(db, ensembleId, doc, directorId)
      drills.push({ ...saved, plan, doc, targets: computeTargets(doc) })
    }

    const conn = await (db.client as { acquireConnection: () => Promise<any> }).acquireConnection()
    try {
      const insTake = conn.prepare(`INSERT INTO takes (ensemble_id, drill_id, drill_version, user_id, part, object_key, original_name, mime, bytes, duration_s, sample_rate, channels, status, created_at, updated_at)
        VALUES (?, ?, ?, ?, ?, ?, ?, 'audio/wav', 0, ?, 22050, 1, 'analysed', ?, ?)`)
      const insAnalysis = conn.prepare(`INSERT INTO analyses (take_id, system, system_name, a4, tolerance, measurement, report, mean_abs_cents, within_tolerance_share, drift_cents_per_min, holds_total, holds_found, is_current, engine_version, duration_ms, created_at)
        VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, 1, ?, 0, ?)`)
      const insHold = conn.prepare(`INSERT INTO hold_results (analysis_id, hold_index, chord_index, note, written_note, member, start_s, end_s, target_hz, equal_hz, detected_hz, cents_from_target, cents_from_equal, spread_cents, slope_cents_per_s, confidence, within_tolerance, reason)
        VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`)
      const yearMs = 365 * 86400_000
      let takes = 0
      let holdRows = 0
      const writeBatch = conn.transaction((batch: Array<() => void>) => { for (const f of batch) f() })
      for (const p of people) {
        const batch: Array<() => void> = []
        for (let k = 0; k < perPlayer; k++) {
          const d = drills[Math.floor(rand() * drills.length)]!
          const at = new Date(now.getTime() - yearMs + ((k + rand()) / perPlayer) * yearMs)
          const progress = k / perPlayer // later takes are a little better
          const spb = 60 / d.doc.tempo!
          const holds: MeasuredHold[] = []
          for (const chord of d.targets.chords) {
            const note = chord.notes.find(n => n.part === p.section)
            if (!note) continue
            const startS = 1 + chord.startBeat * spb
            const endS = startS + chord.beats * spb - 0.2
            const roll = rand()
            const base: MeasuredHold = { index: chord.index, startS, endS, detectedHz: null, spreadCents: null, slopeCentsPerS: null, confidence: 0, vibrato: null, reason: null, reasonCode: null, expectedHz: note.equalHz, steadyStartS: null, steadyEndS: null, centreErrorCents: null }
            if (roll < 0.01) { holds.push({ ...base, reason: 'No steady pitch near the expected note', reasonCode: 'no_pitch' }); continue }
            let cents = p.bias * (1 - progress * 0.5) + (note.member === 'third' ? p.thirds : 0) + normal() * p.scatter - p.improve * progress + (startS / 60) * -4
            if (roll < 0.025) cents = 300 + normal() * 10 // a wrong note, three semitones off
            holds.push({ ...base, detectedHz: note.targetHz * 2 ** (cents / 1200), spreadCents: 2 + rand() * 4, slopeCentsPerS: normal() * 0.5, confidence: 0.85 + rand() * 0.14, steadyStartS: startS + 0.3, steadyEndS: endS - 0.05, centreErrorCents: 0.2 + rand() * 0.3 })
          }
          const measurement: Measurement = { take: { durationS: 2 + d.targets.chords.reduce((s, c) => s + c.beats, 0) * spb, sampleRate: 22050, channels: 1 }, holds, timeScale: 1, offsetS: 1, warnings: [], engine: ENGINE_VERSION }
          const report = scoreMeasurement(measurement, d.targets, p.section, d.doc.tolerance!)
          const iso = at.toISOString()
          batch.push(() => {
            const takeId = Number(insTake.run(ensembleId, d.id, d.version, p.id, p.section, `volume/${randomUUID()}`, 'volume-take.wav', measurement.take.durationS, iso, iso).lastInsertRowid)
            const s = report.summary
            const analysisId = Number(insAnalysis.run(takeId, JSON.stringify(d.doc.system), d.targets.system, 440, d.doc.tolerance, JSON.stringify(measurement), JSON.stringify(report), s.meanAbsCents, s.withinToleranceShare, s.driftCentsPerMin, s.holdsExpected, s.holdsFound, ENGINE_VERSION, iso).lastInsertRowid)
            report.holds.forEach((h, i) => {
              insHold.run(analysisId, i, h.index, h.note, h.writtenNote, h.member, h.startS, h.endS, h.targetHz, h.equalHz, h.detectedHz, h.centsFromTarget, h.centsFromEqual, h.spreadCents, h.slopeCentsPerS, h.confidence, h.withinTolerance === null ? null : h.withinTolerance ? 1 : 0, h.reason)
            })
            holdRows += report.holds.length
          })
          takes++
        }
        writeBatch(batch)
      }
      log(`Volume ensemble: ${players} singers in ${SECTIONS.length} sections, ${drills.length} drills, ${takes} takes, ${holdRows} holds in ${Math.round(performance.now() - t0)} ms`)
      return { ensembleId, players, takes, holds: holdRows }
    } finally {
      await (db.client as { releaseConnection: (c: unknown) => Promise<void> }).releaseConnection(conn)
    }
  } finally {
    await db.destroy()
  }
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const file = process.env.NUXT_DB_FILE ?? DEFAULT_DB_FILE
  seedVolume({ file, log: m => console.log(m) })
    .then((r) => { if (!r) console.log(`${file} already holds the volume ensemble: nothing done.`) })
    .catch((e) => { console.error(`The volume seed failed: ${(e as Error).message}`); process.exit(1) })
}
