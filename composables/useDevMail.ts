import type { Ref } from 'vue'

export interface MailSummary {
  id: string
  to: string
  subject: string
  date: string
}
export interface MailMessage extends MailSummary {
  from: string
  text: string
  html: string
}

/** Messages kept by the embedded mail catcher (development only). */
export function useDevMailList() {
  return useFetch<MailSummary[]>('/api/dev/mail', { key: 'dev-mail', default: () => [] })
}

/** One caught message; nothing is fetched while no message is chosen. */
export function useDevMailMessage(id: Ref<string | null>) {
  return useAsyncData<MailMessage | null>(
    'dev-mail:message',
    () => id.value ? $fetch<MailMessage>(`/api/dev/mail/${encodeURIComponent(id.value)}`) : Promise.resolve(null),
    { watch: [id] },
  )
}

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
