// Builds the demo scenario (seeds/demo/scenario.ts): people, ensembles, sections, drills,
// assignments, and takes whose audio is synthesised here with plausible human deviations,
// uploaded to the object store, each with a queued analysis job. Used by the start-up plugin
// (empty database) and by `npm run db:seed`. Plain Node: no Nitro imports.
import { randomUUID } from 'node:crypto'
import type { Knex } from 'knex'
import { computeTargets } from '../../shared/tuning/index'
import { DrillDocument } from '../../shared/drill/schema'
import { mulberry32, synthTake, type SynthSpec, type SynthTimbre } from '../../server/analysis/synth'
import { encodeWav } from '../../server/analysis/wav'
import { saveDrill } from '../../server/utils/drills'
import { ANALYSE_TAKE_JOB, enqueueJob } from '../../server/utils/jobs'
import { addSectionAssignees } from '../../server/utils/assignments'
import { ASSIGNMENTS, DEMO_PASSWORD, DRILLS, ENSEMBLES, PEOPLE, REVIEWS, TAKES, type DemoTake } from './scenario'

export { DEMO_PASSWORD } from './scenario'

export interface SeedDeps {
  hashPassword: (password: string) => Promise<string>
  /** Stores one object (the take's audio). */
  put: (key: string, bytes: Uint8Array, contentType: string) => Promise<void>
  /** Removes an object again when the seed fails half-way (best effort). */
  remove?: (key: string) => Promise<void>
  log?: (message: string) => void
  /** Seed time; due dates and take dates are relative to it. */
  now?: Date
}

export interface SeedResult { users: number, ensembles: number, drills: number, assignments: number, takes: number, ms: number }

/** Sample rate of the synthesised takes (mono). */
export const DEMO_SAMPLE_RATE = 22050

const DAY = 86400_000

/** True when no account exists yet. */
export async function isDatabaseEmpty (db: Knex): Promise<boolean> {
  const row = await db('users').count<{ n: number }[]>({ n: '*' }).first()
  return Number(row?.n ?? 0) === 0
}

/** Seeds the demo when there is no account yet; null when the database already has data. */
export async function seedDemoIfEmpty (db: Knex, deps: SeedDeps): Promise<SeedResult | null> {
  if (!(await isDatabaseEmpty(db))) return null
  return seedDemo(db, deps)
}

function timbreFor (instrument: string | undefined): SynthTimbre {
  if (instrument === 'voice-soprano' || instrument === 'voice-alto' || instrument === 'voice-tenor' || instrument === 'voice-bass') return instrument
  if (instrument === 'voice-baritone') return 'voice-bass'
  return 'brass'
}

export interface DemoTakeSpec {
  spec: SynthSpec
  /** Per hold: the chord it belongs to, its chord member and target, and the deviation put in (cents). */
  holds: { chord: number, member: string | null, targetHz: number, cents: number }[]
}

/** The synthesis spec of one demo take: the part's notes at their targets, bent by the player's deviation. */
export function demoTakeSpec (take: DemoTake, seed: number, sampleRate = DEMO_SAMPLE_RATE): DemoTakeSpec {
  const drill = DRILLS.find(d => d.key === take.drill)!
  const doc = DrillDocument.parse(drill.document)
  const targets = computeTargets(doc)
  const spb = 60 / doc.tempo
  const rand = mulberry32(seed)
  const normal = () => Math.sqrt(-2 * Math.log(1 - rand())) * Math.cos(2 * Math.PI * rand())
  const dev = take.deviation
  const holds: SynthSpec['holds'] = []
  const truth: DemoTakeSpec['holds'] = []
  for (const chord of targets.chords) {
    const note = chord.notes.find(n => n.part === take.part)
    if (!note) continue // a rest for this part
    // A human start: a little early or late, and a breath before the next chord.
    const startS = take.leadInS + chord.startBeat * spb + (rand() - 0.5) * 0.16
    const endS = take.leadInS + (chord.startBeat + chord.beats) * spb - 0.15 - rand() * 0.1
    const memberBias = note.member && dev.members ? (dev.members as Record<string, number | undefined>)[note.member] ?? 0 : 0
    const cents = (dev.offsetCents ?? 0) + memberBias + (dev.driftCentsPerS ?? 0) * (startS - take.leadInS) + normal() * (dev.scatterCents ?? 0)
    holds.push({ startS, endS, hz: note.targetHz * 2 ** (cents / 1200), driftCentsPerS: dev.driftCentsPerS ?? 0 })
    truth.push({ chord: chord.index, member: note.member, targetHz: note.targetHz, cents })
  }
  const totalBeats = doc.chords.reduce((s, c) => s + c.beats, 0)
  const durationS = Math.round((take.leadInS + totalBeats * spb + 0.8) * 100) / 100
  const instrument = doc.parts.find(p => p.name === take.part)?.instrument
  return {
    spec: { sampleRate, durationS, holds, timbre: timbreFor(instrument), vibrato: dev.vibrato, jitterCents: 1.5, snrDb: 36, seed, breaths: true },
    holds: truth,
  }
}

/** Synthesises one demo take as a mono 16-bit WAV. */
export function synthDemoTake (take: DemoTake, seed: number, sampleRate = DEMO_SAMPLE_RATE): { wav: Uint8Array, durationS: number } {
  const { spec } = demoTakeSpec(take, seed, sampleRate)
  return { wav: encodeWav(synthTake(spec), sampleRate), durationS: spec.durationS }
}

/** Seed of the synthetic audio of TAKES[i]. */
export const demoTakeSeed = (i: number) => 1000 + i * 17

/** Writes the whole demo scenario; audio first, then every row in one transaction. */
export async function seedDemo (db: Knex, deps: SeedDeps): Promise<SeedResult> {
  const t0 = performance.now()
  const now = deps.now ?? new Date()
  const log = deps.log ?? (() => {})

  // Audio: synthesise and upload every take before touching the database.
  const uploaded: string[] = []
  const audio: { key: string, bytes: number, durationS: number }[] = []
  try {
    let pending: Promise<void> = Promise.resolve()
    for (const [i, take] of TAKES.entries()) {
      const { wav, durationS } = synthDemoTake(take, demoTakeSeed(i))
      const key = `takes/${randomUUID()}`
      audio.push({ key, bytes: wav.byteLength, durationS })
      // Upload the previous take while the next one is synthesised.
      await pending
      pending = deps.put(key, wav, 'audio/wav').then(() => { uploaded.push(key) })
    }
    await pending
  } catch (err) {
    await Promise.allSettled(uploaded.map(k => deps.remove?.(k)))
    throw err
  }
  log(`synthesised and stored ${audio.length} takes in ${Math.round(performance.now() - t0)} ms`)

  const hash = await deps.hashPassword(DEMO_PASSWORD)
  const iso = (ms: number) => new Date(ms).toISOString()
  try {
    await db.transaction(async (trx) => {
      const userIds = new Map<string, number>()
      for (const person of PEOPLE) {
        const [row] = await trx('users').insert({
          email: person.email, name: person.name, password_hash: hash, site_role: person.siteRole ?? null,
          created_at: iso(now.getTime() - 60 * DAY), updated_at: iso(now.getTime() - 60 * DAY),
        }).returning('id')
        userIds.set(person.key, row.id)
      }
      const adminId = userIds.get('admin')!

      const ensembleIds = new Map<string, number>()
      const sectionIds = new Map<string, number>() // "ensemble/section"
      for (const e of ENSEMBLES) {
        const [row] = await trx('ensembles').insert({
          name: e.name, kind: e.kind, description: e.description, a4: e.a4, created_by: adminId,
          created_at: iso(now.getTime() - 59 * DAY), updated_at: iso(now.getTime() - 59 * DAY),
        }).returning('id')
        ensembleIds.set(e.key, row.id)
        for (const [position, s] of e.sections.entries()) {
          const [sec] = await trx('sections').insert({ ensemble_id: row.id, name: s.name, position, instrument: s.instrument }).returning('id')
          sectionIds.set(`${e.key}/${s.name}`, sec.id)
        }
        for (const m of e.members) {
          await trx('memberships').insert({
            ensemble_id: row.id, user_id: userIds.get(m.person)!, role: m.role,
            section_id: m.section ? sectionIds.get(`${e.key}/${m.section}`)! : null,
          })
        }
      }

      const directorOf = (ensemble: string) => userIds.get(ENSEMBLES.find(e => e.key === ensemble)!.members.find(m => m.role === 'director')!.person)!
      const drillIds = new Map<string, number>()
      for (const d of DRILLS) {
        const { id } = await saveDrill(trx, ensembleIds.get(d.ensemble)!, d.document, directorOf(d.ensemble))
        drillIds.set(d.key, id)
      }

      const assignmentIds: number[] = []
      for (const a of ASSIGNMENTS) {
        const [row] = await trx('assignments').insert({
          ensemble_id: ensembleIds.get(a.ensemble)!, drill_id: drillIds.get(a.drill)!,
          section_id: a.section ? sectionIds.get(`${a.ensemble}/${a.section}`)! : null,
          title: a.title, instructions: a.instructions,
          due_at: iso(Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), now.getUTCDate()) + a.dueInDays * DAY + 20 * 3600_000),
          created_by: directorOf(a.ensemble),
          created_at: iso(now.getTime() - (Math.max(0, -a.dueInDays) + 7) * DAY),
        }).returning('id')
        assignmentIds.push(row.id)
        await addSectionAssignees(trx, row.id, iso(now.getTime() - (Math.max(0, -a.dueInDays) + 7) * DAY))
      }

      const takeIds: number[] = []
      for (const [i, take] of TAKES.entries()) {
        const drill = DRILLS.find(d => d.key === take.drill)!
        const at = iso(now.getTime() - take.daysAgo * DAY - (i % 5) * 3600_000 - 1800_000)
        const [row] = await trx('takes').insert({
          ensemble_id: ensembleIds.get(drill.ensemble)!, drill_id: drillIds.get(take.drill)!, user_id: userIds.get(take.person)!,
          assignment_id: take.assignment != null ? assignmentIds[take.assignment]! : null,
          part: take.part, object_key: audio[i]!.key, original_name: `${take.drill}-${take.part.toLowerCase().replace(/\s+/g, '-')}.wav`,
          mime: 'audio/wav', bytes: audio[i]!.bytes, duration_s: audio[i]!.durationS, sample_rate: DEMO_SAMPLE_RATE, channels: 1,
          status: 'queued', created_at: at, updated_at: at,
        }).returning('id')
        takeIds.push(row.id)
        await enqueueJob(trx, ANALYSE_TAKE_JOB, { takeId: row.id }, { takeId: row.id })
      }

      for (const r of REVIEWS) {
        const [row] = await trx('reviews').insert({ take_id: takeIds[r.take]!, reviewer_id: userIds.get(r.reviewer)!, verdict: r.verdict, summary: r.summary }).returning('id')
        for (const n of r.notes) await trx('review_notes').insert({ review_id: row.id, hold_index: n.holdIndex, body: n.body })
      }
      await trx('audit_log').insert({ action: 'demo.seeded', data: JSON.stringify({ takes: takeIds.length }) })
    })
  } catch (err) {
    await Promise.allSettled(uploaded.map(k => deps.remove?.(k)))
    throw err
  }
  return {
    users: PEOPLE.length,
    ensembles: ENSEMBLES.length,
    drills: DRILLS.length,
    assignments: ASSIGNMENTS.length,
    takes: TAKES.length,
    ms: Math.round(performance.now() - t0),
  }
}
