// `driftline analyze`: measure a take against a drill and score every held chord of one part.
import type { DrillDocument } from '../shared/drill/schema'
import { TuningError } from '../shared/tuning/index'
import { analyzeTake } from '../server/analysis/index'
import type { TakeReport } from '../server/analysis/index'
import { isAnalysisError } from '../server/analysis/errors'
import { centreRangeText, DRIFT_TOO_FEW, holdKind, withReferencePitch, wrongNoteText } from '../shared/report-wording'
import type { Io } from './common'
import { checkSystemFlags, loadDrill, pad, parseFlags, parseFraction, parseNumber, readInput, signed, SYSTEM_HELP, SYSTEM_OPTIONS, systemFromFlags, TUNING_HELP, UsageError } from './common'

const USAGE = `Usage: driftline analyze --audio FILE --drill FILE --part NAME [options]

Finds every held note of one part in a recorded take, measures its steady pitch and scores it
against the targets of a tuning system (cents from target and from equal temperament).

Options:
  --audio FILE       the take: WAV, FLAC, MP3, Ogg Vorbis, Ogg Opus, WebM/Opus or MP4/AAC (.m4a)
  --drill FILE       drill document (.json), Standard MIDI File (.mid), MusicXML (.musicxml, .xml) or .mxl
  --part NAME        the part that was played or sung (as named in the drill)
${SYSTEM_HELP}
  --a4 HZ            reference pitch A4, from 415 to 466 Hz (default: the drill's)
  --tolerance CENTS  ± cents counted as in tune (default: the drill's)
${TUNING_HELP}
  --json             print JSON instead of a table
  -h, --help         show this help

Exit codes: 0 scored, 1 the input cannot be used (the code is printed on stderr), 2 bad usage.
`

const OPTIONS = {
  audio: { type: 'string' },
  drill: { type: 'string' },
  part: { type: 'string' },
  ...SYSTEM_OPTIONS,
  tolerance: { type: 'string' },
  json: { type: 'boolean', default: false },
  help: { type: 'boolean', short: 'h', default: false },
} as const

/** The report as a table for people. */
export function formatReport (drill: DrillDocument, report: TakeReport): string {
  const lines: string[] = []
  const t = report.take
  lines.push(`${drill.title} — part ${report.part}`)
  lines.push(`Take ${t.durationS.toFixed(1)} s, ${t.sampleRate} Hz, ${t.channels} channel${t.channels === 1 ? '' : 's'}`)
  lines.push(`${withReferencePitch(report.description, report.a4)} · tolerance ±${report.tolerance} ¢`)
  lines.push('')
  const rows = [['Chord', 'Note', 'Member', 'Target Hz', 'Heard Hz', 'From target', 'From equal', 'In tol.', 'Spread', 'Slope', 'Vibrato', 'Conf.']]
  for (const h of report.holds) {
    const kind = holdKind(h)
    if (kind === 'wrong') {
      const heard = h.detectedHz === null ? '—' : h.detectedHz.toFixed(3)
      rows.push([String(h.index + 1), h.note, h.member ?? '—', h.targetHz.toFixed(3), heard, 'wrong note', '—', '—', '—', '—', '—', h.confidence.toFixed(2)])
      continue
    }
    if (kind === 'missing' || h.detectedHz === null) {
      rows.push([String(h.index + 1), h.note, h.member ?? '—', h.targetHz.toFixed(3), '—', '—', '—', '—', '—', '—', '—', '0'])
      continue
    }
    if (h.centsFromTarget === null) {
      // A different note was heard: its pitch, never a deviation.
      rows.push([String(h.index + 1), h.note, h.member ?? '—', h.targetHz.toFixed(3), h.detectedHz.toFixed(3),
        `heard ${h.heardNote ?? '?'}`, '—', '—', '—', '—', '—', h.confidence.toFixed(2)])
      continue
    }
    rows.push([
      String(h.index + 1), h.note, h.member ?? '—', h.targetHz.toFixed(3), h.detectedHz.toFixed(3),
      [`${signed(h.centsFromTarget!, 2)} ¢`, centreRangeText(h.centreErrorCents)].filter(Boolean).join(' '), `${signed(h.centsFromEqual!, 2)} ¢`, h.withinTolerance ? 'yes' : 'no',
      h.spreadCents === null ? '—' : `${h.spreadCents.toFixed(1)} ¢`, h.slopeCentsPerS === null ? '—' : `${signed(h.slopeCentsPerS, 1)} ¢/s`,
      h.vibrato ? `±${h.vibrato.extentCents.toFixed(0)} ¢ ${h.vibrato.rateHz.toFixed(1)} Hz` : '—', h.confidence.toFixed(2),
    ])
  }
  for (const l of pad(rows, (_, c) => c > 2)) lines.push(l)
  const s = report.summary
  lines.push('')
  const parts = [`${s.holdsFound} of ${s.holdsExpected} holds found`]
  if (s.meanAbsCents !== null) parts.push(`mean |deviation| ${s.meanAbsCents.toFixed(2)} ¢`)
  if (s.withinToleranceShare !== null) parts.push(`${Math.round(100 * s.withinToleranceShare)} % within ±${report.tolerance} ¢`)
  if (s.driftCentsPerMin !== null) {
    const u = s.driftUncertaintyCentsPerMin
    parts.push(`drift ${signed(s.driftCentsPerMin, 2)}${u !== null && u !== undefined ? ` ± ${u.toFixed(2)}` : ''} ¢/min`)
  } else if (s.holdsFound > 0) {
    parts.push(`drift: ${DRIFT_TOO_FEW}`)
  }
  if (s.wrongNotes) parts.push(`${s.wrongNotes} wrong note${s.wrongNotes === 1 ? '' : 's'}`)
  lines.push(parts.join(' · '))
  const members = Object.keys(report.memberBias)
  if (members.length) {
    lines.push(`Bias by chord member: ${members.map(m => `${m} ${signed(report.memberBias[m]!, 2)} ¢ (${report.memberCounts[m]})`).join(' · ')}`)
  }
  const wrong = report.holds.filter(h => holdKind(h) === 'wrong')
  if (wrong.length) {
    lines.push('Wrong notes (left out of every figure above):')
    for (const h of wrong) lines.push(`  chord ${h.index + 1}: ${wrongNoteText(h)}`)
  }
  const missing = report.holds.filter(h => holdKind(h) === 'missing')
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
      heardNote: h.heardNote,
      heardCentsFromExpected: h.heardCentsFromExpected,
      reasonCode: h.reasonCode,
      writtenNote: h.writtenNote,
      equalHz: h.equalHz,
      ratio: h.ratio,
      vibrato: h.vibrato,
      steadyStartS: h.steadyStartS,
      steadyEndS: h.steadyEndS,
      centreErrorCents: h.centreErrorCents,
      voiceSpreadCents: h.voiceSpreadCents,
      timing: h.timing,
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
    const values = parseFlags(argv, OPTIONS)
    if (values.help) { io.stdout(USAGE); return 0 }
    if (!values.audio) throw new UsageError('--audio FILE is required')
    if (!values.drill) throw new UsageError('--drill FILE is required')
    if (!values.part) throw new UsageError('--part NAME is required')
    checkSystemFlags(values)
    const a4 = parseNumber(values.a4, '--a4', 'a number such as 442')
    const tolerance = parseNumber(values.tolerance, '--tolerance', 'a number such as 10')
    if (tolerance !== undefined && !(tolerance > 0 && tolerance <= 100)) throw new UsageError(`--tolerance must be more than 0 and at most 100 cents (got "${values.tolerance}")`)
    const fraction = parseFraction(values.fraction)

    const drill = await loadDrill(values.drill, values.key)
    const system = await systemFromFlags(drill, values, fraction)

    const audio = await readInput(values.audio, 'audio file')
    const { report } = await analyzeTake(audio, drill, values.part, {
      system,
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
    if (isAnalysisError(e)) {
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
