// `driftline targets`: the target of every note of a drill in a tuning system, as a table or JSON.
import type { DrillDocument } from '../shared/drill/schema'
import { computeTargets, TuningError } from '../shared/tuning/index'
import type { TargetsResult } from '../shared/tuning/index'
import type { Io } from './common'
import { checkSystemFlags, loadDrill, pad, parseFlags, parseFraction, parseNumber, signed, SYSTEM_HELP, SYSTEM_OPTIONS, systemFromFlags, TUNING_HELP, UsageError } from './common'

const USAGE = `Usage: driftline targets --drill FILE --system SYSTEM [options]

Prints the target pitch of every note of a drill in a tuning system: Hz, cents from
equal temperament at the reference pitch, and the ratio to the chord root.

Options:
  --drill FILE       drill document (.json), Standard MIDI File (.mid), MusicXML (.musicxml, .xml) or .mxl
${SYSTEM_HELP}
  --a4 HZ            reference pitch A4, from 415 to 466 Hz (default: the drill's, else 440)
${TUNING_HELP}
  --json             print JSON instead of a table
  -h, --help         show this help
`

const OPTIONS = {
  drill: { type: 'string' },
  ...SYSTEM_OPTIONS,
  json: { type: 'boolean', default: false },
  help: { type: 'boolean', short: 'h', default: false },
} as const

/** The table for people. */
export function formatTable(drill: DrillDocument, result: TargetsResult): string {
  const lines: string[] = []
  const showWritten = drill.parts.some(p => p.instrument && p.instrument !== 'concert')
  lines.push(`${drill.title}`)
  lines.push(`${result.description}`)
  lines.push(`Key ${result.key} · A4 = ${result.a4} Hz · tempo ${drill.tempo} · ${result.chords.length} chord${result.chords.length === 1 ? '' : 's'}`)
  for (const c of result.chords) {
    lines.push('')
    const name = c.symbol ?? (c.root ? `${c.root} ${c.quality ?? ''}`.trim() : 'unnamed')
    const end = c.startBeat + c.beats
    let head = `Chord ${c.index + 1}  ${name} · beats ${+c.startBeat.toFixed(3)}–${+end.toFixed(3)}`
    if (result.system === 'just-common') head += ` · pitch centre ${signed(c.centreCents, 2)} ¢`
    lines.push(head)
    if (!c.notes.length) { lines.push('  (all parts rest)'); continue }
    const rows = [['Part', 'Note', ...(showWritten ? ['Written'] : []), 'Member', 'Target Hz', 'From equal', 'Ratio']]
    for (const n of c.notes) {
      rows.push([n.part, n.note, ...(showWritten ? [n.writtenNote ?? ''] : []), n.member ?? '—', n.targetHz.toFixed(3), `${signed(n.centsFromEqual, 2)} ¢`, n.ratio ?? '—'])
    }
    for (const l of pad(rows, (cell, c) => c > 0 && /^[+−\d]/.test(cell))) lines.push(`  ${l}`)
  }
  lines.push('')
  if (result.system === 'just-common') lines.push(`Drift after the last chord: ${signed(result.driftCents, 3)} ¢`)
  if (result.warnings.length) {
    lines.push(`Warnings (${result.warnings.length}):`)
    for (const w of result.warnings) lines.push(`  - ${w.message}`)
  } else lines.push('No warnings.')
  return `${lines.join('\n')}\n`
}

/** Runs `driftline targets`; returns the exit code (0 done, 1 bad input, 2 bad usage). */
export async function run(argv: string[], io: Io): Promise<number> {
  try {
    const values = parseFlags(argv, OPTIONS)
    if (values.help) { io.stdout(USAGE); return 0 }
    if (!values.drill) throw new UsageError('--drill FILE is required')
    checkSystemFlags(values)
    const a4 = parseNumber(values.a4, '--a4', 'a number of Hz such as 442')
    const fraction = parseFraction(values.fraction)

    const drill = await loadDrill(values.drill, values.key)
    const system = await systemFromFlags(drill, values, fraction)

    const result = computeTargets(drill, system, a4)
    io.stdout(values.json ? `${JSON.stringify(result, null, 2)}\n` : formatTable(drill, result))
    return 0
  } catch (e) {
    if (e instanceof UsageError) {
      io.stderr(`driftline targets: ${e.message}\n\nRun "driftline targets --help" for the options.\n`)
      return 2
    }
    if (e instanceof TuningError) {
      const lines = [`driftline targets: ${e.issues.length > 1 ? `${e.message.split(':')[0]}:` : e.message}`]
      if (e.issues.length > 1) for (const i of e.issues) lines.push(`  ${i.path}: ${i.message}`)
      io.stderr(`${lines.join('\n')}\n`)
      return 1
    }
    io.stderr(`driftline targets: unexpected error: ${(e as Error)?.message ?? String(e)}\n`)
    return 1
  }
}
