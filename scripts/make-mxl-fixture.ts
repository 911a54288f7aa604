// Builds tests/fixtures/musicxml/closed-score-hymn.mxl: the closed-score hymn packed as a compressed
// MusicXML file (MusicXML 4.0 "compressed file format": a zip whose META-INF/container.xml names
// the score's path in <rootfile full-path>). The score sits in a sub-folder so that a reader must
// follow the container rather than guess. Run: npx tsx scripts/make-mxl-fixture.ts
import { readFileSync, writeFileSync } from 'node:fs'
import { zipSync, strToU8 } from 'fflate'

const dir = new URL('../tests/fixtures/musicxml/', import.meta.url)
const score = readFileSync(new URL('closed-score-hymn.musicxml', dir))
const container = `<?xml version="1.0" encoding="UTF-8"?>
<container>
  <rootfiles>
    <rootfile full-path="scores/harbour-evening.musicxml" media-type="application/vnd.recordare.musicxml+xml"/>
  </rootfiles>
</container>
`
const zip = zipSync({
  // The media type comes first and uncompressed, as in other zip-based document formats.
  'mimetype': [strToU8('application/vnd.recordare.musicxml'), { level: 0 }],
  'META-INF/container.xml': strToU8(container),
  'scores/harbour-evening.musicxml': new Uint8Array(score),
}, { mtime: new Date('2026-01-01T00:00:00Z') })
writeFileSync(new URL('closed-score-hymn.mxl', dir), zip)
console.log(`closed-score-hymn.mxl: ${zip.length} bytes`)
