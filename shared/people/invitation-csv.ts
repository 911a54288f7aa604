// Reading a bulk invitation file (name, e-mail, section, role per row) and checking each row
// before anything is sent. Pure: the caller supplies the ensemble's sections and members.
import Papa from 'papaparse'
import { BULK_MAX_ROWS, email as emailSchema } from '../schemas/ensemble'
import type { BulkProblem, BulkRow, MemberRole } from '../types/ensemble'

export interface RawRow {
  /** Row number in the file; the header is row 1. */
  line: number
  name: string
  email: string
  section: string
  role: string
}

export type CsvError = { code: 'empty_file' | 'missing_header' | 'missing_columns' | 'too_many_rows' | 'bad_quotes', message: string, line?: number }

export type CsvResult =
  | { ok: true, rows: RawRow[], delimiter: string, columns: string[] }
  | { ok: false, error: CsvError }

type Column = 'name' | 'email' | 'section' | 'role'

/** Header words we accept for each column (compared without case, spaces, dashes or underscores). */
const HEADERS: Record<Column, string[]> = {
  name: ['name', 'fullname', 'displayname'],
  email: ['email', 'emailaddress', 'mail', 'address'],
  section: ['section', 'part', 'voicepart', 'voice', 'instrument'],
  role: ['role'],
}

const squash = (s: string) => s.toLowerCase().replace(/[\s_\-.]/g, '')

function columnOf (header: string): Column | null {
  const h = squash(header)
  for (const [col, words] of Object.entries(HEADERS) as [Column, string[]][]) if (words.includes(h)) return col
  return null
}

/** The separator of the header line: the most frequent of comma, semicolon and tab outside quotes. */
export function detectDelimiter (text: string): string {
  const first = text.split(/\r\n|\n|\r/).find(l => l.trim() !== '') ?? ''
  const counts: Record<string, number> = { ',': 0, ';': 0, '\t': 0 }
  let quoted = false
  for (const ch of first) {
    if (ch === '"') quoted = !quoted
    else if (!quoted && ch in counts) counts[ch]!++
  }
  let best = ','
  for (const d of [';', '\t']) if (counts[d]! > counts[best]!) best = d
  return best
}

/** Splits the file into rows by its header; every failure is a message naming the line or column. */
export function parseInvitationCsv (input: string): CsvResult {
  const text = input.replace(/^\uFEFF/, '') // a spreadsheet's byte-order mark is not part of the first header
  if (text.trim() === '') return { ok: false, error: { code: 'empty_file', message: 'The file is empty: give a header line (name, email, section, role) and one line per person' } }
  const delimiter = detectDelimiter(text)
  const parsed = Papa.parse<string[]>(text, { delimiter, skipEmptyLines: false })
  const quoteError = parsed.errors.find(e => e.type === 'Quotes')
  if (quoteError) {
    const line = (quoteError.row ?? 0) + 1
    return { ok: false, error: { code: 'bad_quotes', line, message: `Row ${line} has a quotation mark that is never closed` } }
  }
  const records = parsed.data.map((cells, i) => ({ line: i + 1, cells: cells.map(c => (c ?? '').trim()) }))
    .filter(r => r.cells.some(c => c !== ''))
  const header = records.shift()
  if (!header) return { ok: false, error: { code: 'empty_file', message: 'The file is empty: give a header line (name, email, section, role) and one line per person' } }
  const index: Partial<Record<Column, number>> = {}
  header.cells.forEach((h, i) => {
    const col = columnOf(h)
    if (col && index[col] === undefined) index[col] = i
  })
  if (index.email === undefined && header.cells.some(c => c.includes('@'))) {
    return { ok: false, error: { code: 'missing_header', line: header.line, message: 'The first line must name the columns: name, email, section, role' } }
  }
  const missing = (['name', 'email'] as const).filter(c => index[c] === undefined)
  if (missing.length) {
    const found = header.cells.filter(Boolean).map(c => `"${c}"`).join(', ') || 'none'
    return { ok: false, error: { code: 'missing_columns', line: header.line, message: `The header has no ${missing.join(' or ')} column (columns found: ${found}). Name the columns: name, email, section, role` } }
  }
  if (records.length > BULK_MAX_ROWS) {
    return { ok: false, error: { code: 'too_many_rows', message: `The file has ${records.length.toLocaleString('en')} rows; send at most ${BULK_MAX_ROWS} at a time` } }
  }
  const cell = (cells: string[], col: Column) => (index[col] === undefined ? '' : cells[index[col]!] ?? '')
  const rows = records.map(r => ({ line: r.line, name: cell(r.cells, 'name'), email: cell(r.cells, 'email'), section: cell(r.cells, 'section'), role: cell(r.cells, 'role') }))
  const columns = (Object.keys(index) as Column[]).sort((a, b) => index[a]! - index[b]!)
  return { ok: true, rows, delimiter, columns }
}

/** A role as people write it ("Section leader", "section_leader", "player"); null when unknown. Empty = player. */
export function readRole (text: string): MemberRole | null {
  const r = squash(text)
  if (r === '' || r === 'player' || r === 'singer' || r === 'member' || r === 'musician') return 'player'
  if (r === 'sectionleader' || r === 'leader' || r === 'principal') return 'section_leader'
  if (r === 'director' || r === 'conductor') return 'director'
  return null
}

export interface RowContext {
  sections: { id: number, name: string }[]
  /** Lower-case addresses of the ensemble's members. */
  memberEmails: Set<string>
  /** Lower-case addresses with an open invitation to the ensemble. */
  openInvitationEmails: Set<string>
}

/** Checks every row; a row is `ok` when nothing but an earlier open invitation (which a new one replaces) is noted. */
export function checkRows (rows: RawRow[], ctx: RowContext): BulkRow[] {
  const sections = new Map(ctx.sections.map(s => [s.name.trim().toLowerCase(), s]))
  const known = ctx.sections.map(s => s.name).join(', ')
  const seen = new Map<string, number>()
  return rows.map((r) => {
    const problems: BulkProblem[] = []
    const address = r.email.trim().toLowerCase()
    if (!r.name) problems.push({ code: 'missing_name', field: 'name', message: `Row ${r.line}: the name is empty` })
    if (!address) problems.push({ code: 'missing_email', field: 'email', message: `Row ${r.line}: the e-mail address is empty` })
    else if (!emailSchema.safeParse(address).success) problems.push({ code: 'bad_email', field: 'email', message: `Row ${r.line}: "${r.email}" is not an e-mail address` })
    else if (seen.has(address)) problems.push({ code: 'duplicate', field: 'email', message: `Row ${r.line}: the same address as row ${seen.get(address)}` })
    else if (ctx.memberEmails.has(address)) problems.push({ code: 'existing_member', field: 'email', message: `Row ${r.line}: ${address} is already a member` })
    else if (ctx.openInvitationEmails.has(address)) problems.push({ code: 'open_invitation', field: 'email', message: `Row ${r.line}: ${address} already has an open invitation; a new one replaces it` })
    if (address && !seen.has(address)) seen.set(address, r.line)
    let sectionId: number | null = null
    if (r.section) {
      const s = sections.get(r.section.trim().toLowerCase())
      if (s) sectionId = s.id
      else problems.push({ code: 'unknown_section', field: 'section', message: `Row ${r.line}: there is no section "${r.section}"${known ? ` (sections: ${known})` : ' (the ensemble has no sections yet)'}` })
    }
    const role = readRole(r.role)
    if (!role) problems.push({ code: 'bad_role', field: 'role', message: `Row ${r.line}: "${r.role}" is not a role (director, section leader or player)` })
    const ok = problems.every(p => p.code === 'open_invitation')
    return { line: r.line, name: r.name, email: address || r.email, section: r.section, sectionId, role, ok, problems }
  })
}
