// The take API's shapes, once: the analysis worker produces the report, the server stores and
// sends it, the pages read it. Fields added after the first engine are optional, since reports
// stored earlier are sent as they were stored.
import type { SystemOptions } from '../drill/schema'
import type { ReviewMark, TakeReview } from './review'

export type TakeStatusName = 'queued' | 'analysing' | 'analysed' | 'failed'

/** A stable code with a short sentence (a failed analysis, a refused upload). */
export interface TakeError { code: string, message: string }

/** What the poll (GET /api/takes/:id) and each `status` event of /api/takes/:id/events carry. */
export interface TakeLiveState {
  status: TakeStatusName
  /** 0–1 while analysing; 1 when analysed. */
  progress: number
  error: TakeError | null
}

/** Why a hold has no tuning figure (the engine's stable codes). */
export type HoldReasonCode = 'no_pitch' | 'beyond_take' | 'octave_high' | 'octave_low' | 'wrong_note' | 'too_short'

/** One held note of a take report (the `driftline analyze --json` hold, then the extras). */
export interface ReportHold {
  /** Chord index in the drill. */
  index: number
  /** Concert note expected. */
  note: string
  member: string | null
  startS: number
  endS: number
  targetHz: number
  detectedHz: number | null
  /** Signed cents from the system's target; null when not found or a wrong note. */
  centsFromTarget: number | null
  centsFromEqual: number | null
  spreadCents: number | null
  slopeCentsPerS: number | null
  /** 0–1: how far the figure can be trusted. */
  confidence: number | null
  withinTolerance: boolean | null
  reason: string | null
  reasonCode?: HoldReasonCode | null
  writtenNote?: string | null
  equalHz?: number
  ratio?: string | null
  vibrato?: { rateHz: number, extentCents: number } | null
  steadyStartS?: number | null
  steadyEndS?: number | null
  centreErrorCents?: number | null
  /** Several voices on the part: the spread of their pitches about their centre (RMS, cents); null for one voice. */
  voiceSpreadCents?: number | null
  /** Decimated f0 track: [seconds into the take, Hz]. */
  trace?: Array<[number, number]> | null
  /** Nearest equal-tempered note of what was heard ("E4", concert), for a wrong note. */
  heardNote?: string | null
  /** Signed cents of the heard pitch from the expected note's equal-tempered pitch (e.g. +300.0). */
  heardCentsFromExpected?: number | null
  /** Onset and release found, and how early or late against the beat under the take's time map; null when not placed. */
  timing?: HoldTiming | null
}

/** When a hold sounded in the take (seconds into the take). */
export interface HoldTiming {
  /** Onset found, or null when the hold starts at a chord boundary with no re-articulation. */
  onsetS: number | null
  /** Where the sound of the hold ends, or null when it runs on into the next hold. */
  releaseS: number | null
  /** How the start was decided: an onset in the take, or the drill's chord boundary under the time map. */
  start: 'onset' | 'chord_boundary'
  /** Onset minus the chord's beat under the take's time map (positive = late), null without an onset. */
  fromBeatS: number | null
}

export interface TakeSummary {
  /** Mean |cents from target| over the holds found (null when none was found). */
  meanAbsCents: number | null
  /** Share (0–1) of the holds found within ± tolerance. */
  withinToleranceShare: number | null
  /** Cents per minute over the take (negative = sagging flat); null when the holds are too few to tell. */
  driftCentsPerMin: number | null
  /** Standard uncertainty of the drift, cents per minute, when the engine gives one. */
  driftUncertaintyCentsPerMin?: number | null
  holdsFound: number
  holdsExpected: number
  /** Signed mean cents from target over the holds found. */
  meanCents?: number | null
  /** Holds where a different note was heard (more than 50 ¢ from the expected note). */
  wrongNotes?: number
}

export interface ReportWarning { code: string, message: string }

/** The take report: what the analysis stores and GET /api/takes/:id and the rescore route send. */
export interface TakeReport {
  take: { durationS: number, sampleRate: number, channels: number }
  /** The system's name (reports stored by early versions may carry its options). */
  system: string | SystemOptions
  a4: number
  part: string
  tolerance: number
  holds: ReportHold[]
  summary: TakeSummary
  /** Mean signed cents from target per chord member over the holds found. */
  memberBias?: Record<string, number | null>
  memberCounts?: Record<string, number>
  /** How the system was set up, in words. */
  description?: string
  warnings?: ReportWarning[]
  timeScale?: number
  offsetS?: number
}

/** An earlier take of the same player, drill and part (the comparison table). */
export interface EarlierTake {
  id: number
  createdAt: string
  /** Analysis state; the figures are null until it is 'analysed'. */
  status?: TakeStatusName
  meanAbsCents: number | null
  withinToleranceShare: number | null
  /** Null for an analysed take means too few holds for a meaningful slope. */
  driftCentsPerMin?: number | null
}

/** GET /api/takes/:id */
export interface TakeDetail extends TakeLiveState {
  id: number
  report: TakeReport | null
  drill: { id: number, title: string }
  part: string
  /** Who played the take. */
  player: { id: number, name: string }
  /** Whether the caller is that player (a director or section leader reading it is not). */
  viewerIsPlayer: boolean
  assignmentId: number | null
  createdAt: string
  withdrawnAt: string | null
  canWithdraw: boolean
  canRestore: boolean
  canRescore: boolean
  canReanalyse: boolean
  audioUrl: string
  mime: string
  bytes: number | null
  originalName: string | null
  earlier: EarlierTake[]
  /** Every review of the take, newest first. */
  reviews: TakeReview[]
  /** The caller may review it (its section's leader or a director, not the player). */
  canReview: boolean
}

/** A row of GET /api/takes. */
export interface TakeListItem {
  id: number
  drillId: number
  drillTitle: string
  part: string
  playerName: string
  status: TakeStatusName
  createdAt: string
  meanAbsCents: number | null
  withinToleranceShare: number | null
  withdrawn: boolean
  withdrawnAt: string | null
  assignmentId: number | null
  /** The caller directs the take's ensemble and the take is withdrawn: it can be restored. */
  canRestore: boolean
  /** Who reviewed it and their verdicts, newest first (empty until reviewed). */
  reviewedBy: ReviewMark[]
}

/** GET /api/takes */
export interface TakeListPage {
  items: TakeListItem[]
  total: number
  page: number
  pageSize: number
}

/** POST /api/takes: 202 a new take, 200 the same take again for a repeated idempotency key. */
export interface TakeCreated { id: number, status: TakeStatusName }

/** POST /api/takes/:id/rescore */
export interface TakeRescored { report: TakeReport }

/** POST /api/takes/:id/withdraw and /restore */
export interface TakeWithdrawal { id: number, withdrawnAt: string | null }

/** Limits of a take upload (from the server's configuration). */
export interface TakeUploadLimits { maxBytes: number, maxDurationS: number }
