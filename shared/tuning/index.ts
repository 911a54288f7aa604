// The tuning engine: pitch basics, chord members, every target system, Scala files and transposing
// instruments. Plain TypeScript with no I/O, shared by the server, the browser and the command line.
export { TuningError } from './errors'
export type { TuningIssue } from './errors'
export { Ratio, ratioCents, toRatio, COMMAS, commaName } from './ratio'
export {
  A4_MIN, A4_MAX, parseNote, parsePitchClass, parseKey, noteToMidi, midiToHz, hzToMidi, centsBetween,
  equalHz, checkA4, prettyPc,
} from './pitch'
export type { ParsedNote, ParsedPc, ParsedKey } from './pitch'
export { analyzeChord, parseChordSymbol } from './chord'
export type { ChordAnalysis, ChordMember, ChordNoteRole } from './chord'
export { pureRatio, seventhRatio, TONIC_SCALES } from './just'
export type { SeventhOption } from './just'
export { justTonic, pythagorean, meantone, meantoneFifth, scalaTuning, pcFromFifths, anchorMidi, SCALA_SNAP_CENTS } from './fixed'
export type { FixedTuning, Placement } from './fixed'
export { parseScala, toScala } from './scala'
export type { ScalaScale, ScalaDegree } from './scala'
export { systemToScala } from './export'
export { INSTRUMENTS, getInstrument, writtenNote, concertNote } from './transpose'
export type { Instrument, Clef } from './transpose'
export { computeTargets } from './targets'
export type { TargetsResult, TargetChord, TargetNote, TargetWarning } from './targets'
