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
