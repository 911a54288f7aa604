// The sampled-instrument table of `npm run bench:analysis`: takes rendered with FluidSynth from
// Debian's TimGM6mb soundfont (scripts/sampled-corpus.ts), truth measured with aubiopitch on
// each voice rendered alone, and Praat's autocorrelation pitch (Debian's praat) given each
// hold's steady window, side by side with the engine, which has to find the holds itself.
import { execFileSync } from 'node:child_process'
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { decodeAudio } from '../server/analysis/decode'
import { fitDrift } from '../server/analysis/drift'
import { measureTake } from '../server/analysis/measure'
import type { ExpectedHold, Measurement } from '../server/analysis/types'
import { aubioTracks, buildSampledCorpus, logMeanOf, missingTool, voiceShapeCents, wholeVibratoCycles } from '../scripts/sampled-corpus'
import type { RenderedTake, TakeKind } from '../scripts/sampled-corpus'
import { CENTRE_RANGE_FLOOR_CENTS, centreRangeCents } from '../shared/report-wording'

const cents = (a: number, b: number) => 1200 * Math.log2(a / b)
const etHz = (midi: number) => 440 * Math.pow(2, (midi - 69) / 12)

/** The drill's expected holds for the measured part of a rendered take. */
export function expectedOf (take: RenderedTake): ExpectedHold[] {
  const spec = take.spec
  const part = spec.parts.find(p => p.name === spec.part)!
  const spb = 60 / spec.tempo
  let beat = 0
  return spec.beats.map((b, index) => {
    const startS = beat * spb
    beat += b
    const midi = part.notes[index] ?? null
    return { index, startS, endS: beat * spb, midi, expectedHz: midi === null ? 0 : etHz(midi) }
  })
}

/** Praat (To Pitch (ac), "very accurate") mean pitch in semitones over each window, as Hz. */
function praatMeans (wav: string, windows: Array<{ a: number, b: number, hz: number }>, work: string): Array<number | null> {
  const lines = [
    `s = Read from file: "${wav}"`,
    'm = Convert to mono',
  ]
  for (const w of windows) {
    lines.push(
      'selectObject: m',
      `p = Extract part: ${w.a.toFixed(4)}, ${w.b.toFixed(4)}, "rectangular", 1, "no"`,
      `pt = To Pitch (ac): 0, ${(w.hz / 1.6).toFixed(2)}, 15, "yes", 0.03, 0.45, 0.01, 0.35, 0.14, ${(w.hz * 1.6).toFixed(2)}`,
      'v = Get mean: 0, 0, "semitones re 1 Hz"',
      'appendInfoLine: fixed$(v, 6)',
      'removeObject: p, pt',
    )
  }
  const script = join(work, 'means.praat')
  writeFileSync(script, `${lines.join('\n')}\n`)
  const out = execFileSync('praat', ['--run', script], { encoding: 'utf8', stdio: ['ignore', 'pipe', 'ignore'] })
  return out.trim().split('\n').map(l => (/^-?[0-9.]+$/.test(l.trim()) ? Math.pow(2, Number(l) / 12) : null))
}

/**
 * Spread between the voices of a section asked for over a hold's steady window: the RMS over
 * time of the standard deviation across voices of each voice's detune plus vibrato (the chord's
 * offset and the drift are shared by every voice and do not spread them).
 */
export function askedVoiceSpread (take: RenderedTake, hold: { steadyStartS: number, steadyEndS: number }): number | null {
  const voices = take.spec.parts.find(p => p.name === take.spec.part)!.voices
  if (voices.length < 2) return null
  let sum = 0
  let n = 0
  for (let t = hold.steadyStartS; t <= hold.steadyEndS; t += 0.005) {
    const c = voices.map(v => voiceShapeCents(v, t))
    const mean = c.reduce((a, b) => a + b, 0) / c.length
    sum += c.reduce((a, b) => a + (b - mean) ** 2, 0) / c.length
    n++
  }
  return Math.sqrt(sum / n)
}

/** Truths agree when aubiopitch and Praat, each on the voices rendered alone, are this close (cents). */
export const TRUTH_AGREED_CENTS = 0.5

/**
 * A second truth of every hold from an estimator independent of aubiopitch: Praat on each voice
 * of the measured part rendered alone, over the same windows (whole vibrato cycles of that
 * voice), averaged over the voices in log-frequency. Where the two disagree, the hold's pitch
 * depends on the estimator (a sampled chorus, a sample whose partials are not quite harmonic) and
 * no sub-cent figure can be checked against it.
 */
function soloPraatTruths (take: RenderedTake, work: string): Array<number | null> {
  const voices = take.spec.parts.find(p => p.name === take.spec.part)!.voices
  const perVoice = voices.map((v, vi) => praatMeans(take.file.replace(/\.wav$/, `.solo${vi}.wav`),
    take.holds.map(h => ({ ...wholeVibratoCycles(h.steadyStartS, h.steadyEndS, v.vibrato), hz: h.truthHz })), work))
  return take.holds.map((_, i) => {
    const all = perVoice.map(pv => pv[i])
    if (all.some(v => !v)) return null
    return Math.pow(2, all.reduce<number>((s, v) => s + Math.log2(v!), 0) / all.length)
  })
}

/**
 * aubiopitch on each voice rendered alone over the steady window Driftline chose (cut, per voice,
 * to whole cycles of that voice's vibrato), averaged over the voices: a sampled voice wanders by
 * itself, so a hold's pitch depends on the stretch it is taken over, and this tells the
 * measurement apart from the choice of window. Null where a voice gives too few frames.
 */
function ownWindowTruth (take: RenderedTake, tracks: Array<Array<() => Array<[number, number]>>>, a: number, b: number, nearHz: number): number | null {
  const voices = take.spec.parts.find(p => p.name === take.spec.part)!.voices
  let sum = 0
  for (const [vi, v] of voices.entries()) {
    const w = wholeVibratoCycles(a, b, v.vibrato)
    if (!(w.b > w.a)) return null
    try { sum += Math.log2(logMeanOf(tracks[vi]!, w.a, w.b, nearHz)) } catch { return null }
  }
  return Math.pow(2, sum / voices.length)
}

/** Driftline's centre against ownWindowTruth, cents; null when the hold was not measured. */
function ownWindowErr (found: boolean, held: Measurement['holds'][number], take: RenderedTake, tracks: Array<Array<() => Array<[number, number]>>>, nearHz: number): number | null {
  if (!found || held.steadyStartS == null || held.steadyEndS == null) return null
  const ref = ownWindowTruth(take, tracks, held.steadyStartS, held.steadyEndS, nearHz)
  return ref ? cents(held.detectedHz!, ref) : null
}

interface HoldRow {
  kind: TakeKind
  take: string
  spread: number | null
  spreadAsked: number | null
  found: boolean
  err: number | null
  praatErr: number | null
  /** Praat on each voice rendered alone against aubiopitch's truth, cents (the truth's own uncertainty). */
  truthAgreement: number | null
  /** Driftline against aubiopitch on the voices alone over Driftline's own steady window, cents. */
  ownWindowErr: number | null
  onsetErr: number | null
  /** The ± range the report shows for the centre (cents), null when not measured. */
  range: number | null
  confidence: number
  tied: boolean
  /** GM programs of the measured part's voices. */
  programs: number[]
}

function q (v: number[], p: number): number {
  if (!v.length) return NaN
  const a = [...v].sort((x, y) => x - y)
  const pos = p * (a.length - 1)
  const lo = Math.floor(pos)
  return a[lo]! + (a[Math.ceil(pos)]! - a[lo]!) * (pos - lo)
}
const f = (v: number, d = 2) => (Number.isFinite(v) ? v.toFixed(d) : '—')

export async function sampledTable (dir: string): Promise<string[]> {
  const missing = missingTool()
  if (missing) return [`Sampled-instrument table skipped: ${missing} is not installed.`]
  try { execFileSync('praat', ['--version'], { stdio: 'ignore' }) } catch { return ['Sampled-instrument table skipped: praat (Debian package praat) is not installed.'] }
  const corpus = buildSampledCorpus(dir)
  const work = mkdtempSync(join(tmpdir(), 'driftline-praat-'))
  const rows: HoldRow[] = []
  const takeRows: Array<{ take: RenderedTake, m: Measurement, drift: number | null, driftSe: number | null, truthDrift: number | null }> = []
  try {
    for (const take of corpus.takes) {
      const audio = await decodeAudio(new Uint8Array(readFileSync(take.file)))
      const expected = expectedOf(take)
      const m = measureTake(audio, expected, { trace: false })
      const praat = praatMeans(take.file, take.holds.map(h => ({ a: h.steadyStartS, b: h.steadyEndS, hz: h.truthHz })), work)
      const soloPraat = soloPraatTruths(take, work)
      const soloTracks = take.spec.parts.find(p => p.name === take.spec.part)!.voices.map((_, vi) => aubioTracks(take.file.replace(/\.wav$/, `.solo${vi}.wav`)))
      take.holds.forEach((t, i) => {
        const held = m.holds.find(h => h.index === t.index)!
        const found = held.detectedHz !== null && held.reasonCode === null
        rows.push({
          kind: take.spec.kind, take: take.spec.id, found,
          err: found ? cents(held.detectedHz!, t.truthHz) : null,
          praatErr: praat[i] ? cents(praat[i]!, t.truthHz) : null,
          truthAgreement: soloPraat[i] ? cents(soloPraat[i]!, t.truthHz) : null,
          ownWindowErr: ownWindowErr(found, held, take, soloTracks, t.truthHz),
          onsetErr: found ? held.startS - t.onS : null, range: found ? centreRangeCents(held.centreErrorCents) : null,
          confidence: held.confidence, tied: t.tied,
          spread: found ? held.voiceSpreadCents ?? null : null, spreadAsked: askedVoiceSpread(take, t),
          programs: take.spec.parts.find(p => p.name === take.spec.part)!.voices.map(v => v.program),
        })
      })
      const pts = m.holds.filter(h => h.detectedHz !== null && h.reasonCode === null).map(h => ({
        tMin: ((h.steadyStartS ?? h.startS) + (h.steadyEndS ?? h.endS)) / 2 / 60, cents: cents(h.detectedHz!, h.expectedHz), errorCents: h.centreErrorCents,
      }))
      const d = fitDrift(pts)
      const truthFit = fitDrift(take.holds.map(h => ({ tMin: (h.steadyStartS + h.steadyEndS) / 2 / 60, cents: cents(h.truthHz, etHz(h.midi)), errorCents: null })))
      takeRows.push({ take, m, drift: d.centsPerMin, driftSe: d.uncertaintyCentsPerMin, truthDrift: truthFit.centsPerMin })
    }
  } finally {
    rmSync(work, { recursive: true, force: true })
  }

  const out: string[] = []
  const agreed = (r: HoldRow) => r.truthAgreement !== null && Math.abs(r.truthAgreement) <= TRUTH_AGREED_CENTS
  const agreedCells = (g: HoldRow[]) => {
    const a = g.filter(agreed)
    const af = a.filter(r => r.found).map(r => Math.abs(r.err!))
    const ap = a.filter(r => r.praatErr !== null).map(r => Math.abs(r.praatErr!))
    return [`${a.length}/${g.length}`, `${f(q(af, 0.5), 3)} / ${f(q(af, 0.95), 3)} (${af.length} found)`, `${f(q(ap, 0.5), 3)} / ${f(q(ap, 0.95), 3)}`]
  }
  const groups: Array<[string, (r: HoldRow) => boolean, string, string]> = [
    ['instruments (one part)', r => r.kind === 'instrument', '≤ 0.3', '≤ 1.0'],
    ['voices (one singer)', r => r.kind === 'voice', '≤ 0.5', '≤ 1.5'],
    ['sections (3–12 voices)', r => r.kind === 'section' && !r.take.endsWith('-long'), '≤ 0.5', '≤ 1.5'],
    ['sections, long tones (3–5 s holds)', r => r.take.endsWith('-long'), '≤ 0.5', '≤ 1.5'],
    ['whole chords (quartet, one part)', r => r.kind === 'chord', '—', '—'],
  ]
  const table: string[][] = [['group (holds)', 'found', 'onset ≤ 0.1 s', 'median / p95 |err| ¢ (target)', 'Driftline', 'Praat (given windows)', `truths agree ≤ ${TRUTH_AGREED_CENTS} ¢`, 'Driftline there', 'Praat there', 'Driftline there, truth over its own window']]
  for (const [name, sel, tMed, tP95] of groups) {
    const g = rows.filter(sel)
    if (!g.length) continue
    const found = g.filter(r => r.found)
    const e = found.map(r => Math.abs(r.err!))
    const pe = g.filter(r => r.praatErr !== null).map(r => Math.abs(r.praatErr!))
    const on = found.filter(r => Math.abs(r.onsetErr!) <= 0.1).length
    table.push([
      `${name} (${g.length})`,
      `${found.length}/${g.length} (${(100 * found.length / g.length).toFixed(1)} %)`,
      `${on}/${found.length}`,
      `${tMed} / ${tP95}`,
      `${f(q(e, 0.5), 3)} / ${f(q(e, 0.95), 3)}`,
      `${f(q(pe, 0.5), 3)} / ${f(q(pe, 0.95), 3)} (${pe.length})`,
      ...agreedCells(g),
      ((w: number[]) => `${f(q(w, 0.5), 3)} / ${f(q(w, 0.95), 3)} (${w.length})`)(g.filter(r => agreed(r) && r.ownWindowErr !== null).map(r => Math.abs(r.ownWindowErr!))),
    ])
  }
  const widths = table[0]!.map((_, c) => Math.max(...table.map(r => [...r[c]!].length)))
  for (const [i, r] of table.entries()) {
    out.push(r.map((cell, c) => cell.padEnd(widths[c]!)).join(' | ').trimEnd())
    if (i === 0) out.push(widths.map(w => '-'.repeat(w)).join('-|-'))
  }
  const hi = rows.filter(r => r.found && r.confidence >= 0.8)
  const hiOk = hi.filter(r => Math.abs(r.err!) <= 1).length
  out.push('')
  out.push(`Confidence calibration: holds at confidence ≥ 0.8 within 1 ¢ of the truth: ${hiOk}/${hi.length} (${f(100 * hiOk / Math.max(1, hi.length), 1)} %; target ≥ 95 %).`)
  const hiA = hi.filter(agreed)
  out.push(`  where the truths agree: ${hiA.filter(r => Math.abs(r.err!) <= 1).length}/${hiA.length}.`)
  for (const band of [[0, 0.5], [0.5, 0.8], [0.8, 1.01]] as const) {
    const b = rows.filter(r => r.found && r.confidence >= band[0] && r.confidence < band[1])
    out.push(`  confidence ${band[0]}–${Math.min(1, band[1])}: ${b.length} holds, within 1 ¢: ${b.filter(r => Math.abs(r.err!) <= 1).length}`)
  }
  const inRange = (g: HoldRow[]) => `${g.filter(r => r.range !== null && Math.abs(r.err!) <= r.range).length}/${g.length}`
  const measured = rows.filter(r => r.found && r.kind !== 'chord')
  out.push(`Centre range (the ± the report shows: two standard errors + ${CENTRE_RANGE_FLOOR_CENTS} ¢) holds the truth on ${inRange(measured.filter(agreed))} holds where the truths agree ` +
    `(target 95 %), ${inRange(measured)} of every measured hold; whole chords ${inRange(rows.filter(r => r.found && r.kind === 'chord'))}.`)
  const byTake = [...new Set(rows.map(r => r.take))].map((id) => {
    const d = rows.filter(r => r.take === id && r.truthAgreement !== null).map(r => Math.abs(r.truthAgreement!))
    return `${id} ${f(q(d, 0.5))}/${f(Math.max(...d))}`
  })
  out.push(`Truth agreement per take (aubiopitch vs Praat on each voice alone, median/largest ¢): ${byTake.join(', ')}.`)
  const spreadRows = rows.filter(r => r.spreadAsked !== null && r.found)
  if (spreadRows.length) {
    const told = spreadRows.filter(r => r.spread !== null)
    const rel = told.map(r => Math.abs(r.spread! - r.spreadAsked!) / r.spreadAsked!)
    out.push(`Spread between voices (sections): told on ${told.length}/${spreadRows.length} holds; asked median ${f(q(spreadRows.map(r => r.spreadAsked!), 0.5), 1)} ¢, ` +
      `measured median ${f(q(told.map(r => r.spread!), 0.5), 1)} ¢; relative error median ${f(100 * q(rel, 0.5), 0)} %, p95 ${f(100 * q(rel, 0.95), 0)} %.`)
  }
  const single = rows.filter(r => r.spreadAsked === null && r.found)
  if (single.length) {
    const told = single.filter(r => r.spread !== null)
    // Choir Aahs (GM 52) is itself a recorded chorus: its plain note, no bend asked, already beats.
    const aahs = (r: HoldRow) => r.programs.every(p => p === 52)
    out.push(`Spread between voices on one-voice holds: told (wrongly) on ${told.length}/${single.length}; ` +
      `on the Choir Aahs patch (52) ${told.filter(aahs).length}/${single.filter(aahs).length}, on every other patch ${told.filter(r => !aahs(r)).length}/${single.filter(r => !aahs(r)).length}.`)
  }
  const tied = rows.filter(r => r.tied)
  if (tied.length) out.push(`Tied repeats (no re-articulation): ${tied.filter(r => r.found).length}/${tied.length} found, median |err| ${f(q(tied.filter(r => r.found).map(r => Math.abs(r.err!)), 0.5), 3)} ¢.`)
  out.push('')
  out.push('Time map and drift per take (rendered exactly in tempo; drift: Driftline ± SE vs the fit of the truths, asked value in brackets):')
  for (const t of takeRows) {
    const s = t.take.spec
    const drift = s.driftCentsPerMin !== 0
      ? `, drift ${t.drift === null ? 'not enough holds' : f(t.drift)} ± ${f(t.driftSe ?? NaN)} vs ${f(t.truthDrift ?? NaN)} (${s.driftCentsPerMin}) ¢/min` +
        (t.drift !== null && t.truthDrift ? `, ${f(100 * Math.abs(t.drift - t.truthDrift) / Math.abs(t.truthDrift), 1)} % off` : '')
      : ''
    const worst = rows.filter(r => r.take === s.id && r.found).reduce((w, r) => Math.max(w, Math.abs(r.err!)), 0)
    out.push(`  ${s.id.padEnd(13)} tempo ${f(100 * (t.m.timeScale - 1), 2).padStart(6)} %, offset error ${f(t.m.offsetS - s.leadInS, 3).padStart(6)} s, worst |err| ${f(worst, 2)} ¢${drift}`)
  }
  const only = takeRows.filter(t => t.take.spec.driftCentsPerMin !== 0 && t.take.spec.offsets.every(o => o === 0))
  if (only.length) {
    out.push(`Drift on the takes that only drift (target: within 10 % of the fit of the truths): ${only.map((t) => {
      const off = t.drift !== null && t.truthDrift ? `${f(100 * Math.abs(t.drift - t.truthDrift) / Math.abs(t.truthDrift), 1)} % off` : 'not enough holds'
      return `${t.take.spec.id} ${t.drift === null ? '—' : f(t.drift)} ± ${f(t.driftSe ?? NaN)} vs ${f(t.truthDrift ?? NaN)} ¢/min, ${off}`
    }).join('; ')}.`)
  }
  out.push(`Bend check (FluidSynth, asked → rendered ¢, aubiopitch): ${corpus.bendCheck.map(b => `${b.asked} → ${b.measured}`).join(', ')}`)
  const cal = Object.values(corpus.calibration)
  out.push(`Plain-note calibration (aubiopitch, ${cal.length} program/note pairs): ${f(Math.min(...cal))} to ${f(Math.max(...cal))} ¢ from equal temperament.`)
  return out
}
