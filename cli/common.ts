// What the `driftline` commands share, so a drill and a tuning system read the same in each of them.
import { readFile } from 'node:fs/promises'
import { basename } from 'node:path'
import { parseArgs } from 'node:util'
import type { ParseArgsConfig } from 'node:util'
import { readDrillFile } from '../shared/drill/import'
import type { DrillDocument, SystemOptions } from '../shared/drill/schema'
import { parseDrill, SYSTEM_NAMES } from '../shared/drill/schema'
import { TuningError } from '../shared/tuning/index'

/** Where a command writes, passed in so tests can capture the output instead of the process streams. */
export interface Io {
  stdout: (s: string) => void
  stderr: (s: string) => void
}

/** Bad command-line usage: kept apart from bad input because it exits 2 and points to --help. */
export class UsageError extends Error {}

/** Parses a command's flags strictly (no positionals); parser complaints become usage errors. */
export function parseFlags<T extends NonNullable<ParseArgsConfig['options']>>(argv: string[], options: T) {
  try {
    return parseArgs({ args: argv, options, strict: true, allowPositionals: false }).values
  } catch (e) {
    throw new UsageError((e as Error).message)
  }
}

/** The tuning-system flags for `parseArgs`; spread into each command's options so they parse alike. */
export const SYSTEM_OPTIONS = {
  system: { type: 'string' },
  a4: { type: 'string' },
  tonic: { type: 'string' },
  start: { type: 'string' },
  wolf: { type: 'string' },
  fraction: { type: 'string' },
  scala: { type: 'string' },
  seventh: { type: 'string' },
  key: { type: 'string' },
} as const

/** Help for --system; the --a4 line differs per command, so it is left to each. */
export const SYSTEM_HELP = `  --system SYSTEM    ${SYSTEM_NAMES.join(' | ')}
                     (the drill's own system when left out)`

/** Help for the flags that shape a system and key a MIDI drill, worded once for every command. */
export const TUNING_HELP = `  --tonic NOTE       tonic of just-tonic, pythagorean, meantone and scala (default: the key's)
  --start NOTE       pythagorean, meantone: first note of the chain of fifths
  --wolf NOTE        pythagorean, meantone: the note whose fifth above is the wolf
  --fraction F       meantone: fraction of the syntonic comma per fifth (1/4, 1/6, 0.2; default 1/4)
  --scala FILE       scala: a Scala .scl file
  --seventh KIND     just-root, just-common: harmonic (7/4) or 5-limit (16/9, 9/5); default harmonic
  --key KEY          key of a MIDI drill, such as "Eb major" (default: the file's key signature)`

/** Reads a whole file; a file-system failure becomes an `unreadable_file` error in words a user can act on. */
export async function readInput(path: string, what: string): Promise<Uint8Array> {
  try {
    return new Uint8Array(await readFile(path))
  } catch (e) {
    const err = e as NodeJS.ErrnoException
    const why = err.code === 'ENOENT' ? 'no such file' : err.code === 'EISDIR' ? 'it is a folder' : err.code === 'EACCES' ? 'permission denied' : err.message
    throw new TuningError('unreadable_file', `Cannot read the ${what} "${path}": ${why}`)
  }
}

/** Loads a drill from JSON or MIDI; the header is sniffed too, since MIDI files often come without the extension. */
export async function loadDrill(path: string, key: string | undefined): Promise<DrillDocument> {
  const bytes = await readInput(path, 'drill file')
  // Drill JSON, a Standard MIDI File, MusicXML or compressed MusicXML (.mxl), told apart by their first bytes.
  const { drill } = readDrillFile(bytes, { fileName: basename(path), key, textAsJson: true })
  return drill
}

/** Rejects an unknown --system or --seventh before any file is read, so usage errors come first. */
export function checkSystemFlags(values: { system?: string, seventh?: string }): void {
  if (values.system !== undefined && !(SYSTEM_NAMES as readonly string[]).includes(values.system)) {
    throw new UsageError(`--system must be one of ${SYSTEM_NAMES.join(', ')} (got "${values.system}")`)
  }
  if (values.seventh !== undefined && values.seventh !== 'harmonic' && values.seventh !== '5-limit') {
    throw new UsageError(`--seventh must be harmonic or 5-limit (got "${values.seventh}")`)
  }
}

/** A plain unsigned decimal, since `Number` would also take hex, exponents and blanks; `expected` finishes the message. */
export function parseNumber(raw: string | undefined, flag: string, expected: string): number | undefined {
  if (raw === undefined) return undefined
  const v = Number(raw)
  if (!/^\s*\d+(\.\d+)?\s*$/.test(raw) || !Number.isFinite(v)) throw new UsageError(`${flag} must be ${expected} (got "${raw}")`)
  return v
}

/** --fraction as the system expects it: "p/q" stays text so the ratio is kept exact, a decimal becomes a number. */
export function parseFraction(raw: string | undefined): string | number | undefined {
  if (raw === undefined) return undefined
  const f = raw.trim()
  if (/^\d+\s*\/\s*\d+$/.test(f)) return f
  if (/^\d*\.?\d+$/.test(f)) return Number(f)
  throw new UsageError(`--fraction must be a fraction such as 1/4 or a number such as 0.25 (got "${raw}")`)
}

/** The flags that `systemFromFlags` reads, as `parseArgs` gives them. */
export interface SystemFlags {
  system?: string
  tonic?: string
  start?: string
  wolf?: string
  scala?: string
  seventh?: string
}

/** The system to score against: the drill's own options carry over when it names the same system; the command line wins. */
export async function systemFromFlags(drill: DrillDocument, values: SystemFlags, fraction: string | number | undefined): Promise<Partial<SystemOptions>> {
  const name = (values.system ?? (values.scala ? 'scala' : drill.system.name)) as SystemOptions['name']
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
  return system as Partial<SystemOptions>
}

/** Signed to `digits` places with a true minus sign (U+2212); a value that rounds to zero shows as +0 rather than −0. */
export function signed(x: number, digits: number): string {
  const v = Math.abs(x) < 0.5 * 10 ** -digits ? 0 : x
  return `${v < 0 ? '\u2212' : '+'}${Math.abs(v).toFixed(digits)}`
}

/** Pads table rows to column widths counted in code points, so − and ¢ count as one column each. */
export function pad(cells: string[][], alignRight: (cell: string, column: number) => boolean): string[] {
  const widths = cells[0]!.map((_, c) => Math.max(...cells.map(r => [...r[c]!].length)))
  return cells.map(r => r.map((cell, c) => {
    const fill = ' '.repeat(widths[c]! - [...cell].length)
    return alignRight(cell, c) ? fill + cell : cell + fill
  }).join('  ').trimEnd())
}
