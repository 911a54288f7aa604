// `driftline targets`: the target of every note of a drill in a tuning system, as a table or JSON.
import { readFile } from 'node:fs/promises'
import { extname } from 'node:path'
import { parseArgs } from 'node:util'
import { midiToDrill } from '../shared/drill/midi'
import type { DrillDocument, SystemOptions } from '../shared/drill/schema'
import { parseDrill, SYSTEM_NAMES } from '../shared/drill/schema'
import { computeTargets, TuningError } from '../shared/tuning/index'
import type { TargetsResult } from '../shared/tuning/index'

interface Io {
  stdout: (s: string) => void
  stderr: (s: string) => void
}

const USAGE = `Usage: driftline targets --drill FILE --system SYSTEM [options]

Prints the target pitch of every note of a drill in a tuning system: Hz, cents from
equal temperament at the reference pitch, and the ratio to the chord root.

Options:
  --drill FILE       drill document (.json) or Standard MIDI File (.mid, .midi)
  --system SYSTEM    ${SYSTEM_NAMES.join(' | ')}
                     (the drill's own system when left out)
  --a4 HZ            reference pitch A4, from 415 to 466 Hz (default: the drill's, else 440)
  --tonic NOTE       tonic of just-tonic, pythagorean, meantone and scala (default: the key's)
  --start NOTE       pythagorean, meantone: first note of the chain of fifths
  --wolf NOTE        pythagorean, meantone: the note whose fifth above is the wolf
  --fraction F       meantone: fraction of the syntonic comma per fifth (1/4, 1/6, 0.2; default 1/4)
  --scala FILE       scala: a Scala .scl file
  --seventh KIND     just-root, just-common: harmonic (7/4) or 5-limit (16/9, 9/5); default harmonic
  --key KEY          key of a MIDI drill, such as "Eb major" (default: the file's key signature)
  --json             print JSON instead of a table
  -h, --help         show this help
`

const OPTIONS = {
  drill: { type: 'string' },
  system: { type: 'string' },
  a4: { type: 'string' },
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

async function readInput(path: string, what: string): Promise<Uint8Array> {
  try {
    return new Uint8Array(await readFile(path))
  } catch (e) {
    const err = e as NodeJS.ErrnoException
    const why = err.code === 'ENOENT' ? 'no such file' : err.code === 'EISDIR' ? 'it is a folder' : err.code === 'EACCES' ? 'permission denied' : err.message
    throw new TuningError('unreadable_file', `Cannot read the ${what} "${path}": ${why}`)
  }
}

async function loadDrill(path: string, key: string | undefined): Promise<DrillDocument> {
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

const sign = (x: number, digits: number) => {
  const v = Math.abs(x) < 0.5 * 10 ** -digits ? 0 : x
  return `${v < 0 ? '−' : '+'}${Math.abs(v).toFixed(digits)}`
}

function pad(cells: string[][]): string[] {
  const widths = cells[0]!.map((_, c) => Math.max(...cells.map(r => [...r[c]!].length)))
  return cells.map(r => r.map((cell, c) => {
    const fill = ' '.repeat(widths[c]! - [...cell].length)
    return /^[+−\d]/.test(cell) && c > 0 ? fill + cell : cell + fill
  }).join('  ').trimEnd())
}

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
    if (result.system === 'just-common') head += ` · pitch centre ${sign(c.centreCents, 2)} ¢`
    lines.push(head)
    if (!c.notes.length) { lines.push('  (all parts rest)'); continue }
    const rows = [['Part', 'Note', ...(showWritten ? ['Written'] : []), 'Member', 'Target Hz', 'From equal', 'Ratio']]
    for (const n of c.notes) {
      rows.push([n.part, n.note, ...(showWritten ? [n.writtenNote ?? ''] : []), n.member ?? '—', n.targetHz.toFixed(3), `${sign(n.centsFromEqual, 2)} ¢`, n.ratio ?? '—'])
    }
    for (const l of pad(rows)) lines.push(`  ${l}`)
  }
  lines.push('')
  if (result.system === 'just-common') lines.push(`Drift after the last chord: ${sign(result.driftCents, 3)} ¢`)
  if (result.warnings.length) {
    lines.push(`Warnings (${result.warnings.length}):`)
    for (const w of result.warnings) lines.push(`  - ${w.message}`)
  } else lines.push('No warnings.')
  return `${lines.join('\n')}\n`
}

/** Runs `driftline targets`; returns the exit code (0 done, 1 bad input, 2 bad usage). */
export async function run(argv: string[], io: Io): Promise<number> {
  try {
    let values
    try {
      values = parseArgs({ args: argv, options: OPTIONS, strict: true, allowPositionals: false }).values
    } catch (e) {
      throw new UsageError((e as Error).message)
    }
    if (values.help) { io.stdout(USAGE); return 0 }
    if (!values.drill) throw new UsageError('--drill FILE is required')
    if (values.system !== undefined && !(SYSTEM_NAMES as readonly string[]).includes(values.system)) {
      throw new UsageError(`--system must be one of ${SYSTEM_NAMES.join(', ')} (got "${values.system}")`)
    }
    if (values.seventh !== undefined && values.seventh !== 'harmonic' && values.seventh !== '5-limit') {
      throw new UsageError(`--seventh must be harmonic or 5-limit (got "${values.seventh}")`)
    }
    let a4: number | undefined
    if (values.a4 !== undefined) {
      a4 = Number(values.a4)
      if (!/^\s*\d+(\.\d+)?\s*$/.test(values.a4) || !Number.isFinite(a4)) throw new UsageError(`--a4 must be a number of Hz such as 442 (got "${values.a4}")`)
    }
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

    const result = computeTargets(drill, system as Partial<SystemOptions>, a4)
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
