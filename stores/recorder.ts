// The recorder's choices and the microphone's permission state, shared across the take pages
// (the chosen input and count-in stay when a player records a second part).

export type MicPermission = 'unknown' | 'requesting' | 'granted' | 'denied' | 'no-device' | 'busy' | 'insecure' | 'unsupported' | 'error'

/** Formats a browser records in that the analysis reads, best first. */
// Chromium and Firefox record Opus; Safari only MP4/AAC, which the analysis also decodes.
export const RECORD_MIME_TYPES = ['audio/webm;codecs=opus', 'audio/ogg;codecs=opus', 'audio/webm', 'audio/mp4;codecs=mp4a.40.2', 'audio/mp4'] as const

/** The first recording format this browser supports that Driftline decodes, or null. */
export function pickRecordMime(isSupported: (mime: string) => boolean): string | null {
  for (const m of RECORD_MIME_TYPES) {
    try { if (isSupported(m)) return m }
    catch { /* an old browser throws on unknown types */ }
  }
  return null
}

/** What went wrong when asking for the microphone, and what the player can do about it. */
export function describeMicError(err: unknown): { permission: MicPermission, message: string } {
  const name = (err as { name?: string })?.name ?? ''
  switch (name) {
    case 'NotAllowedError':
    case 'PermissionDeniedError':
    case 'SecurityError':
      return {
        permission: 'denied',
        message: 'Microphone access was refused. Open this site’s settings in your browser (the icon at the left of the address bar), allow the microphone, then reload this page. On a phone, also check that the browser may use the microphone in the system settings.',
      }
    case 'NotFoundError':
    case 'DevicesNotFoundError':
    case 'OverconstrainedError':
      return { permission: 'no-device', message: 'No microphone was found. Plug one in (or choose another input) and try again.' }
    case 'NotReadableError':
    case 'TrackStartError':
    case 'AbortError':
      return { permission: 'busy', message: 'The microphone is in use by another program or could not be started. Close other recording or call apps and try again.' }
    default:
      return { permission: 'error', message: 'The microphone could not be opened. Try again, or upload a recording instead.' }
  }
}

export const useRecorderStore = defineStore('recorder', () => {
  const permission = ref<MicPermission>('unknown')
  const message = ref<string | null>(null)
  /** Chosen input device id ('' = the browser's default). */
  const deviceId = ref('')
  const devices = ref<{ deviceId: string, label: string }[]>([])
  /** Count-in beats at the drill's tempo before the first chord (0 = none). */
  const countInBeats = ref(4)
  /** Play the part's practice tones in the headphones while recording. */
  const guideTones = ref(true)

  function setPermission(p: MicPermission, msg: string | null = null) {
    permission.value = p
    message.value = msg
  }

  function setDevices(list: { deviceId: string, label: string }[]) {
    devices.value = list
    if (deviceId.value && !list.some(d => d.deviceId === deviceId.value)) deviceId.value = ''
  }

  return { permission, message, deviceId, devices, countInBeats, guideTones, setPermission, setDevices }
})
