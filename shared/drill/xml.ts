import { XMLParser, XMLValidator } from 'fast-xml-parser'
import { TuningError } from '../tuning/errors'

/** One XML element with its attributes, child elements in document order and its own text. */
export interface XmlElement {
  name: string
  attrs: Record<string, string>
  children: XmlElement[]
  text: string
}

type Ordered = Record<string, unknown>

function toElement(node: Ordered): XmlElement | null {
  const name = Object.keys(node).find(k => k !== ':@' && k !== '#text')
  if (!name || name.startsWith('?') || name.startsWith('!')) return null
  const attrs = (node[':@'] ?? {}) as Record<string, string>
  const raw = node[name] as Ordered[] | undefined
  const children: XmlElement[] = []
  let text = ''
  for (const c of raw ?? []) {
    if (Object.hasOwn(c, '#text')) text += String(c['#text'])
    else {
      const el = toElement(c)
      if (el) children.push(el)
    }
  }
  return { name, attrs: Object.fromEntries(Object.entries(attrs).map(([k, v]) => [k, String(v)])), children, text: text.trim() }
}

/**
 * Parses XML text into elements in document order (order matters in MusicXML: a <backup>
 * between notes moves time back). Throws TuningError('not_xml') naming the line of the fault.
 */
export function parseXml(text: string): XmlElement {
  const clean = text.replace(/^\uFEFF/, '')
  // A score needs no entities of its own; declared ones could expand without bound.
  if (/<!ENTITY/i.test(clean)) throw new TuningError('xml_entities', 'The file declares its own XML entities, which a MusicXML score does not use; it was not read')
  const valid = XMLValidator.validate(clean)
  if (valid !== true) {
    const { line, msg } = valid.err
    throw new TuningError('not_xml', `The file is not well-formed XML: line ${line}: ${msg}`, `line ${line}`)
  }
  const parser = new XMLParser({
    preserveOrder: true,
    ignoreAttributes: false,
    attributeNamePrefix: '',
    parseTagValue: false,
    parseAttributeValue: false,
    trimValues: true,
    processEntities: true,
    htmlEntities: true,
  })
  const nodes = parser.parse(clean) as Ordered[]
  for (const n of nodes) {
    const el = toElement(n)
    if (el) return el
  }
  throw new TuningError('not_xml', 'The file holds no XML element')
}

/** The first child element with this name. */
export function child(el: XmlElement | undefined, name: string): XmlElement | undefined {
  return el?.children.find(c => c.name === name)
}

/** Every child element with this name. */
export function childrenOf(el: XmlElement | undefined, name: string): XmlElement[] {
  return el ? el.children.filter(c => c.name === name) : []
}

/** Text of the first child with this name ('' when absent). */
export function childText(el: XmlElement | undefined, name: string): string {
  return child(el, name)?.text ?? ''
}
