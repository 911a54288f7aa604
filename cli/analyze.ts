// `driftline analyze`: measure a take against a drill and score every held chord of one part.
import { readFile } from 'node:fs/promises'
import { extname } from 'node:path'
import { parseArgs } from 'node:util'
import { midiToDrill } from '../shared/drill/midi'
import type { DrillDocument, SystemOptions } from '../shared/drill/schema'
import { parseDrill, SYSTEM_NAMES } from '../shared/drill/schema'
import { TuningError } from '../shared/tuning/index'
import { analyzeTake } from '../server/analysis/index'
import type { TakeReport } from '../server/analysis/index'
import { isAnalysisError } from '../server/analysis/errors'

interface Io {
  stdout: (s: string) => void
  stderr: (s: string) => void
}

const USAGE = `Usage: driftline analyze --audio FILE --drill FILE --part NAME [options]

Finds every held note of one part in a recorded take, measures its steady pitch and scores it
against the targets of a tuning system (cents from target and from equal temperament).

Options:
  --audio FILE       the take: WAV, FLAC, MP3, Ogg Vorbis, Ogg Opus or WebM/Opus
  --drill FILE       drill document (.json) or Standard MIDI File (.mid, .midi)
  --part NAME        the part that was played or sung (as named in the drill)
  --system SYSTEM    ${SYSTEM_NAMES.join(' | ')}
                     (the drill's own system when left out)
  --a4 HZ            reference pitch A4, from 415 to 466 Hz (default: the drill's)
  --tolerance CENTS  ± cents counted as in tune (default: the drill's)
  --tonic NOTE       tonic of just-tonic, pythagorean, meantone and scala (default: the key's)
  --start NOTE       pythagorean, meantone: first note of the chain of fifths
  --wolf NOTE        pythagorean, meantone: the note whose fifth above is the wolf
  --fraction F       meantone: fraction of the syntonic comma per fifth (1/4, 1/6, 0.2; default 1/4)
  --scala FILE       scala: a Scala .scl file
  --seventh KIND     just-root, just-common: harmonic (7/4) or 5-limit (16/9, 9/5); default harmonic
  --key KEY          key of a MIDI drill, such as "Eb major" (default: the file's key signature)
  --json             print JSON instead of a table
  -h, --help         show this help

Exit codes: 0 scored, 1 the input cannot be used (the code is printed on stderr), 2 bad usage.
`

const OPTIONS = {
  audio: { type: 'string' },
  drill: { type: 'string' },
  part: { type: 'string' },
  system: { type: 'string' },
  a4: { type: 'string' },
  tolerance: { type: 'string' },
  tonic: { type: 'string' },
  start: { type: 'string' },
  wolf: { type: 'string' },
  fraction: { type: 'string' },
  scala: { type: 'string' },
  seventh: { type: 'string' },
  key: { type: 'string' },
  json: { type: 'boolean', default: false },
  help: { type: 'boolean', short: 'h', default: false },
} as const

class UsageError extends Error {}

class InputError extends Error {
  readonly code: string
  constructor (code: string, message: string) {
    super(message)
    this.code = code
  }
}

async function readInput (path: string, what: string): Promise<Uint8Array> {
  try {
    return new Uint8Array(await readFile(path))
  } catch (e) {
    const err = e as NodeJS.ErrnoException
    const why = err.code === 'ENOENT' ? 'no such file' : err.code === 'EISDIR' ? 'it is a folder' : err.code === 'EACCES' ? 'permission denied' : err.message
    throw new InputError('unreadable_file', `Cannot read the ${what} "${path}": ${why}`)
  }
}

async function loadDrill (path: string, key: string | undefined): Promise<DrillDocument> {
  const bytes = await readInput(path, 'drill file')
  const ext = extname(path).toLowerCase()
  const isMidi = ext === '.mid' || ext === '.midi' || (bytes.length >= 4 && String.fromCharCode(...bytes.subarray(0, 4)) === 'MThd')
  if (isMidi) return midiToDrill(bytes, key ? { key } : {})
  let text: string
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(bytes)
  } catch {
    throw new TuningError('invalid_json', `The drill file "${path}" is neither a MIDI file nor UTF-8 JSON text`)
  }
  const drill = parseDrill(text)
  return key ? parseDrill({ ...drill, key }) : drill
}

const MINUS = '\u2212'
const signed = (x: number, digits: number) => {
  const v = Math.abs(x) < 0.5 * 10 ** -digits ? 0 : x
  return `${v < 0 ? MINUS : '+'}${Math.abs(v).toFixed(digits)}`
}

function pad (cells: string[][]): string[] {
  const widths = cells[0]!.map((_, c) => Math.max(...cells.map(r => [...r[c]!].length)))
  return cells.map(r => r.map((cell, c) => {
    const fill = ' '.repeat(widths[c]! - [...cell].length)
    return c > 2 ? fill + cell : cell + fill
  }).join('  ').trimEnd())
}

/** The report as a table for people. */
export function formatReport (drill: DrillDocument, report: TakeReport): string {
  const lines: string[] = []
  const t = report.take
  lines.push(`${drill.title} — part ${report.part}`)
  lines.push(`Take ${t.durationS.toFixed(1)} s, ${t.sampleRate} Hz, ${t.channels} channel${t.channels === 1 ? '' : 's'}`)
  lines.push(`${report.description} · A4 = ${report.a4} Hz · tolerance ±${report.tolerance} ¢`)
  lines.push('')
  const rows = [['Chord', 'Note', 'Member', 'Target Hz', 'Heard Hz', 'From target', 'From equal', 'In tol.', 'Spread', 'Slope', 'Vibrato', 'Conf.']]
  for (const h of report.holds) {
    if (h.detectedHz === null) {
      rows.push([String(h.index + 1), h.note, h.member ?? '—', h.targetHz.toFixed(3), '—', '—', '—', '—', '—', '—', '—', '0'])
      continue
    }
    rows.push([
      String(h.index + 1), h.note, h.member ?? '—', h.targetHz.toFixed(3), h.detectedHz.toFixed(3),
      `${signed(h.centsFromTarget!, 2)} ¢`, `${signed(h.centsFromEqual!, 2)} ¢`, h.withinTolerance ? 'yes' : 'no',
      `${h.spreadCents!.toFixed(1)} ¢`, `${signed(h.slopeCentsPerS!, 1)} ¢/s`,
      h.vibrato ? `±${h.vibrato.extentCents.toFixed(0)} ¢ ${h.vibrato.rateHz.toFixed(1)} Hz` : '—', h.confidence.toFixed(2),
    ])
  }
  for (const l of pad(rows)) lines.push(l)
  const s = report.summary
  lines.push('')
  const parts = [`${s.holdsFound} of ${s.holdsExpected} holds found`]
  if (s.meanAbsCents !== null) parts.push(`mean |deviation| ${s.meanAbsCents.toFixed(2)} ¢`)
  if (s.withinToleranceShare !== null) parts.push(`${Math.round(100 * s.withinToleranceShare)} % within ±${report.tolerance} ¢`)
  if (s.driftCentsPerMin !== null) parts.push(`drift ${signed(s.driftCentsPerMin, 2)} ¢/min`)
  lines.push(parts.join(' · '))
  const members = Object.keys(report.memberBias)
  if (members.length) {
    lines.push(`Bias by chord member: ${members.map(m => `${m} ${signed(report.memberBias[m]!, 2)} ¢ (${report.memberCounts[m]})`).join(' · ')}`)
  }
  const missing = report.holds.filter(h => h.detectedHz === null)
  if (missing.length) {
    lines.push('Not measured:')
    for (const h of missing) lines.push(`  chord ${h.index + 1} (${h.note}): ${h.reason ?? 'no pitch found'}`)
  }
  for (const w of report.warnings) if (w.code !== 'holds_missing') lines.push(`Note: ${w.message}`)
  return `${lines.join('\n')}\n`
}

/** The JSON of `--json`: the fixed shape first, extra fields after (traces left out). */
export function reportJson (report: TakeReport): unknown {
  return {
    take: report.take,
    system: report.system,
    a4: report.a4,
    part: report.part,
    holds: report.holds.map(h => ({
      index: h.index,
      note: h.note,
      member: h.member,
      startS: h.startS,
      endS: h.endS,
      targetHz: h.targetHz,
      detectedHz: h.detectedHz,
      centsFromTarget: h.centsFromTarget,
      centsFromEqual: h.centsFromEqual,
      spreadCents: h.spreadCents,
      slopeCentsPerS: h.slopeCentsPerS,
      confidence: h.confidence,
      withinTolerance: h.withinTolerance,
      reason: h.reason,
      reasonCode: h.reasonCode,
      writtenNote: h.writtenNote,
      equalHz: h.equalHz,
      ratio: h.ratio,
      vibrato: h.vibrato,
      steadyStartS: h.steadyStartS,
      steadyEndS: h.steadyEndS,
      centreErrorCents: h.centreErrorCents,
    })),
    summary: report.summary,
    tolerance: report.tolerance,
    memberBias: report.memberBias,
    memberCounts: report.memberCounts,
    description: report.description,
    warnings: report.warnings,
    timeScale: report.timeScale,
    offsetS: report.offsetS,
  }
}

/** Runs `driftline analyze`; returns the exit code (0 done, 1 bad input, 2 bad usage). */
export async function run (argv: string[], io: Io): Promise<number> {
  try {
    let values
    try {
      values = parseArgs({ args: argv, options: OPTIONS, strict: true, allowPositionals: false }).values
    } catch (e) {
      throw new UsageError((e as Error).message)
    }
    if (values.help) { io.stdout(USAGE); return 0 }
    if (!values.audio) throw new UsageError('--audio FILE is required')
    if (!values.drill) throw new UsageError('--drill FILE is required')
    if (!values.part) throw new UsageError('--part NAME is required')
    if (values.system !== undefined && !(SYSTEM_NAMES as readonly string[]).includes(values.system)) {
      throw new UsageError(`--system must be one of ${SYSTEM_NAMES.join(', ')} (got "${values.system}")`)
    }
    if (values.seventh !== undefined && values.seventh !== 'harmonic' && values.seventh !== '5-limit') {
      throw new UsageError(`--seventh must be harmonic or 5-limit (got "${values.seventh}")`)
    }
    const num = (raw: string | undefined, flag: string, example: string): number | undefined => {
      if (raw === undefined) return undefined
      const v = Number(raw)
      if (!/^\s*\d+(\.\d+)?\s*$/.test(raw) || !Number.isFinite(v)) throw new UsageError(`${flag} must be a number such as ${example} (got "${raw}")`)
      return v
    }
    const a4 = num(values.a4, '--a4', '442')
    const tolerance = num(values.tolerance, '--tolerance', '10')
    if (tolerance !== undefined && !(tolerance > 0 && tolerance <= 100)) throw new UsageError(`--tolerance must be more than 0 and at most 100 cents (got "${values.tolerance}")`)
    let fraction: string | number | undefined
    if (values.fraction !== undefined) {
      const f = values.fraction.trim()
      if (/^\d+\s*\/\s*\d+$/.test(f)) fraction = f
      else if (/^\d*\.?\d+$/.test(f)) fraction = Number(f)
      else throw new UsageError(`--fraction must be a fraction such as 1/4 or a number such as 0.25 (got "${values.fraction}")`)
    }

    const drill = await loadDrill(values.drill, values.key)
    const name = (values.system ?? (values.scala ? 'scala' : drill.system.name)) as SystemOptions['name']
    // Options the drill sets for the same system carry over; the command line wins.
    const base: Partial<SystemOptions> = drill.system.name === name ? { ...drill.system } : { name }
    const system: Record<string, unknown> = { ...base, name }
    if (values.tonic !== undefined) system.tonic = values.tonic
    if (values.start !== undefined) system.start = values.start
    if (values.wolf !== undefined) system.wolf = values.wolf
    if (fraction !== undefined) system.fraction = fraction
    if (values.seventh !== undefined) system.seventh = values.seventh
    if (values.scala !== undefined) {
      const bytes = await readInput(values.scala, 'Scala file')
      system.scala = new TextDecoder('utf-8').decode(bytes)
    }
    if (name === 'scala' && !system.scala) throw new UsageError('--system scala needs --scala FILE')

    const audio = await readInput(values.audio, 'audio file')
    const { report } = await analyzeTake(audio, drill, values.part, {
      system: system as Partial<SystemOptions>,
      ...(a4 !== undefined ? { a4 } : {}),
      ...(tolerance !== undefined ? { tolerance } : {}),
    })
    io.stdout(values.json ? `${JSON.stringify(reportJson(report), null, 2)}\n` : formatReport(drill, report))
    return 0
  } catch (e) {
    if (e instanceof UsageError) {
      io.stderr(`driftline analyze: usage: ${e.message}\n\nRun "driftline analyze --help" for the options.\n`)
      return 2
    }
    if (isAnalysisError(e) || e instanceof InputError) {
      io.stderr(`driftline analyze: ${e.code}: ${e.message}\n`)
      return 1
    }
    if (e instanceof TuningError) {
      const lines = [`driftline analyze: ${e.code}: ${e.message}`]
      if (e.issues.length > 1) for (const i of e.issues) lines.push(`  ${i.path}: ${i.message}`)
      io.stderr(`${lines.join('\n')}\n`)
      return 1
    }
    io.stderr(`driftline analyze: internal_error: ${(e as Error)?.message ?? String(e)}\n`)
    return 1
  }
}
