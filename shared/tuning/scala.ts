import { TuningError } from './errors'
import { Ratio } from './ratio'

/** One pitch of a Scala scale: its size above 1/1 in cents and, when written as a ratio, the exact ratio. */
export interface ScalaDegree {
  cents: number
  ratio: Ratio | null
}

/** A parsed Scala .scl scale. `degrees` excludes the implied 1/1; its last entry is the period (usually 2/1). */
export interface ScalaScale {
  description: string
  degrees: ScalaDegree[]
}

const MAX_NOTES = 4096

function fail(line: number, message: string): never {
  throw new TuningError('bad_scala', `Scala file, line ${line}: ${message}`, `line ${line}`)
}

/** Reads one pitch value: with a '.' it is cents, otherwise a ratio n/d or a whole number n (n/1). */
function parseValue(token: string, line: number): ScalaDegree {
  if (token.includes('.')) {
    if (!/^[+-]?(\d+\.\d*|\.\d+)$/.test(token)) fail(line, `"${token}" is not a cents value such as 701.955`)
    const cents = Number(token)
    if (!Number.isFinite(cents)) fail(line, `"${token}" is not a finite cents value`)
    return { cents, ratio: null }
  }
  const m = /^([+-]?\d+)(?:\/([+-]?\d+))?$/.exec(token)
  if (!m) fail(line, `"${token}" is not a ratio such as 3/2 or a cents value such as 701.955`)
  const n = BigInt(m[1]!)
  const d = BigInt(m[2] ?? '1')
  if (n <= 0n || d <= 0n) fail(line, `"${token}" is not a positive ratio`)
  const ratio = new Ratio(n, d)
  return { cents: ratio.cents(), ratio }
}

/**
 * Parses the text of a Scala .scl file: lines starting with '!' are comments; the first other line
 * is the description (may be empty), the next the number of pitches, then one pitch per line.
 * Errors name the line.
 */
export function parseScala(text: string): ScalaScale {
  if (typeof text !== 'string') throw new TuningError('bad_scala', 'The Scala file is not text')
  const lines = text.replace(/^\uFEFF/, '').split(/\r\n|\r|\n/)
  let description: string | null = null
  let count: number | null = null
  let countLine = 0
  let descriptionLine = 1
  const degrees: ScalaDegree[] = []
  for (let i = 0; i < lines.length; i++) {
    const lineNo = i + 1
    const raw = lines[i]!
    if (raw.startsWith('!')) continue
    if (description === null) { description = raw.trim(); descriptionLine = lineNo; continue }
    const token = raw.trim().split(/\s+/)[0] ?? ''
    if (count === null) {
      if (!token) continue
      if (!/^\d+$/.test(token)) fail(lineNo, `expected the number of pitches (a whole number), found "${token}"`)
      count = Number(token)
      countLine = lineNo
      if (count > MAX_NOTES) fail(lineNo, `${count} pitches is more than the ${MAX_NOTES} we read`)
      continue
    }
    if (degrees.length === count) break
    if (!token) continue
    degrees.push(parseValue(token, lineNo))
  }
  if (description === null) fail(1, 'the file is empty; it needs a description line, the number of pitches and the pitches')
  if (count === null) fail(descriptionLine, 'the number of pitches is missing after this description line')
  if (degrees.length < count) {
    fail(lines.length, `line ${countLine} declares ${count} pitches but ${degrees.length === 0 ? 'none follow' : `only ${degrees.length} follow`}`)
  }
  return { description, degrees }
}

/** Writes a scale as a Scala .scl file (ratios as n/d, other pitches as cents with six decimals). */
export function toScala(scale: ScalaScale, fileName?: string): string {
  const out: string[] = []
  if (fileName) out.push(`! ${fileName}`, '!')
  out.push(scale.description.replace(/[\r\n]+/g, ' '), ` ${scale.degrees.length}`, '!')
  for (const d of scale.degrees) {
    if (d.ratio) out.push(` ${d.ratio.toString()}`)
    else {
      if (!Number.isFinite(d.cents)) throw new TuningError('bad_scala', 'A scale degree is not a finite number of cents')
      out.push(` ${d.cents.toFixed(6)}`)
    }
  }
  return `${out.join('\n')}\n`
}
