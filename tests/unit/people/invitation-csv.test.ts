import { describe, expect, it } from 'vitest'
import { checkRows, detectDelimiter, parseInvitationCsv, readRole, type RawRow } from '../../../shared/people/invitation-csv'

const ctx = {
  sections: [{ id: 1, name: 'Soprano' }, { id: 2, name: 'Alto' }],
  memberEmails: new Set(['member@example.org']),
  openInvitationEmails: new Set(['pending@example.org']),
}

function rows (text: string): RawRow[] {
  const r = parseInvitationCsv(text)
  if (!r.ok) throw new Error(r.error.message)
  return r.rows
}

describe('reading the file', () => {
  it('reads quoted fields with separators, doubled quotes and line breaks inside them', () => {
    // RFC 4180 §2 rules 5–7: a field in double quotes may hold commas, line breaks and "" for a quote.
    const text = 'name,email,section,role\r\n"Lind, Clara",clara@example.org,Soprano,player\r\n"Ana ""Nan"" Ruiz",ana@example.org,Alto,\r\n"Two\r\nLines",two@example.org,,\r\n'
    const r = parseInvitationCsv(text)
    expect(r.ok).toBe(true)
    if (!r.ok) return
    expect(r.rows.map(x => x.name)).toEqual(['Lind, Clara', 'Ana "Nan" Ruiz', 'Two\r\nLines'])
    expect(r.rows.map(x => x.email)).toEqual(['clara@example.org', 'ana@example.org', 'two@example.org'])
    expect(r.rows[0]!.line).toBe(2) // the header is row 1
  })

  it('ignores a byte-order mark before the first header', () => {
    // U+FEFF at the start of a UTF-8 file is a byte-order mark, not text (Unicode Standard §23.8; common practice for spreadsheet exports).
    const r = parseInvitationCsv('\uFEFFname,email\nA,a@example.org\n')
    expect(r.ok && r.columns).toEqual(['name', 'email'])
  })

  it('reads semicolon- and tab-separated files (common practice where the decimal mark is a comma)', () => {
    expect(detectDelimiter('name;email;section\n')).toBe(';')
    expect(detectDelimiter('name\temail\n')).toBe('\t')
    expect(detectDelimiter('"a;b",email\n')).toBe(',') // a separator inside quotes does not count (RFC 4180 §2 rule 6)
    const r = parseInvitationCsv('Name;E-mail;Section;Role\n"Reyes; T.";t@example.org;Alto;Section leader\n')
    expect(r.ok).toBe(true)
    if (!r.ok) return
    expect(r.delimiter).toBe(';')
    expect(r.rows[0]).toEqual({ line: 2, name: 'Reyes; T.', email: 't@example.org', section: 'Alto', role: 'Section leader' })
  })

  it('skips blank lines but keeps row numbers true to the file', () => {
    const r = rows('name,email\n\nA,a@example.org\n  \nB,b@example.org')
    expect(r.map(x => x.line)).toEqual([3, 5])
  })

  it.each([
    ['', 'empty_file', /empty/],
    ['\uFEFF\n\n', 'empty_file', /empty/],
    ['Clara,clara@example.org,Soprano\n', 'missing_header', /first line must name the columns/],
    ['name,section\nClara,Soprano\n', 'missing_columns', /no email column \(columns found: "name", "section"\)/],
    ['email\nclara@example.org\n', 'missing_columns', /no name column/],
    ['name,email\n"Clara,clara@example.org\n', 'bad_quotes', /Row 2 .*never closed/],
  ])('refuses %j with %s', (text, code, message) => {
    const r = parseInvitationCsv(text)
    expect(r.ok).toBe(false)
    if (r.ok) return
    expect(r.error.code).toBe(code)
    expect(r.error.message).toMatch(message)
    expect(r.error.message).not.toMatch(/undefined|\[object/)
  })

  it('refuses more than 500 rows and says how many the file has', () => {
    const big = `name,email\n${Array.from({ length: 5000 }, (_, i) => `P${i},p${i}@example.org`).join('\n')}\n`
    const r = parseInvitationCsv(big)
    expect(r.ok).toBe(false)
    if (!r.ok) expect(r.error.message).toBe('The file has 5,000 rows; send at most 500 at a time')
    expect(parseInvitationCsv(`name,email\n${Array.from({ length: 500 }, (_, i) => `P${i},p${i}@example.org`).join('\n')}`).ok).toBe(true)
  })
})

describe('checking each row', () => {
  it('marks bad addresses, unknown sections, duplicates, members and bad roles, naming the row', () => {
    const text = [
      'name,email,section,role',
      'Good One,good@example.org,soprano,Player', // section names match without case
      'No At,no-at-sign.example.org,Alto,',
      'Twice,good@example.org,Alto,',
      'Member,MEMBER@example.org,Alto,',
      'Lost,lost@example.org,Tenor,',
      'Odd,odd@example.org,,boss',
      ',noname@example.org,,',
      'Pending,pending@example.org,Alto,leader',
    ].join('\n')
    const checked = checkRows(rows(text), ctx)
    const codes = checked.map(r => r.problems.map(p => p.code))
    expect(codes).toEqual([[], ['bad_email'], ['duplicate'], ['existing_member'], ['unknown_section'], ['bad_role'], ['missing_name'], ['open_invitation']])
    expect(checked.map(r => r.ok)).toEqual([true, false, false, false, false, false, false, true])
    expect(checked[0]).toMatchObject({ sectionId: 1, role: 'player', email: 'good@example.org' })
    expect(checked[2]!.problems[0]!.message).toBe('Row 4: the same address as row 2')
    expect(checked[4]!.problems[0]!.message).toBe('Row 6: there is no section "Tenor" (sections: Soprano, Alto)')
    expect(checked[7]!.role).toBe('section_leader')
  })

  it.each([
    // RFC 5321 §4.5.3.1.1: a local part holds at most 64 octets.
    [`${'a'.repeat(64)}@example.org`, true],
    [`${'a'.repeat(65)}@example.org`, false],
    // RFC 5322 §3.4.1: addr-spec is local-part "@" domain; exactly one unquoted "@" (common practice for plain addresses).
    ['two@@example.org', false],
    ['name@', false],
    ['@example.org', false],
    ['first.last+choir@example.org', true],
  ])('%s is %s', (address, ok) => {
    const [row] = checkRows([{ line: 2, name: 'X', email: address, section: '', role: '' }], ctx)
    expect(row!.ok).toBe(ok)
  })

  it('reads roles as people write them', () => {
    expect(['', 'Player', 'section leader', 'Section_Leader', 'DIRECTOR', 'boss'].map(readRole))
      .toEqual(['player', 'player', 'section_leader', 'section_leader', 'director', null])
  })
})
