// Text typed into a server-rendered page before the app has taken it over (on a slow phone, or
// by a password manager's autofill) would be replaced by the app's own field values when it
// starts: Vue sets each bound field from its model while hydrating. This keeps it: fields whose
// text differs from what the server sent, or that get typed into until the app is ready, are
// given their text back afterwards, with an input event so the app's model takes it.
const TEXT_TYPES = new Set(['text', 'email', 'password', 'search', 'tel', 'url', 'number', 'date', 'time', 'datetime-local', 'month', 'week'])
type Field = HTMLInputElement | HTMLTextAreaElement

function textField(el: EventTarget | null): Field | null {
  if (el instanceof HTMLTextAreaElement) return el
  if (el instanceof HTMLInputElement && TEXT_TYPES.has(el.type)) return el
  return null
}

export default defineNuxtPlugin((nuxtApp) => {
  if (!nuxtApp.isHydrating) return
  const typed = new Map<Field, string>()
  for (const el of document.querySelectorAll('input, textarea')) {
    const f = textField(el)
    if (f && f.value !== f.defaultValue) typed.set(f, f.value)
  }
  const onInput = (e: Event) => {
    const f = textField(e.target)
    if (f) typed.set(f, f.value)
  }
  document.addEventListener('input', onInput, true)
  nuxtApp.hook('app:suspense:resolve', () => {
    document.removeEventListener('input', onInput, true)
    for (const [f, value] of typed) {
      if (!f.isConnected || f.value === value) continue
      f.value = value
      f.dispatchEvent(new Event('input', { bubbles: true }))
    }
    typed.clear()
  })
})
