/** One problem in a document, with the place it was found ("chords.2.notes.Alto", "line 7"). */
export interface TuningIssue {
  path: string
  message: string
}

/**
 * Bad input to the tuning engine or a drill importer. `code` is stable for programs, `path`
 * names the place (field path, "line 7", "track 2") and the message is written for people.
 */
export class TuningError extends Error {
  readonly code: string
  readonly path: string | null
  readonly issues: TuningIssue[]

  constructor(code: string, message: string, path: string | null = null, issues: TuningIssue[] = []) {
    super(message)
    this.name = 'TuningError'
    this.code = code
    this.path = path
    this.issues = issues.length ? issues : path ? [{ path, message }] : []
  }
}
