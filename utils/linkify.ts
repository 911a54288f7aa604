/** Splits plain text into text and http(s) links so mailed links can be followed. */
export function linkifyParts(text: string): { text: string, href?: string }[] {
  const parts: { text: string, href?: string }[] = []
  const re = /https?:\/\/[^\s<>"')]+/g
  let last = 0
  for (const m of text.matchAll(re)) {
    if (m.index > last) parts.push({ text: text.slice(last, m.index) })
    parts.push({ text: m[0], href: m[0] })
    last = m.index + m[0].length
  }
  if (last < text.length) parts.push({ text: text.slice(last) })
  return parts
}
