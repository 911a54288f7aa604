/**
 * "Now" shared by server render and hydration (so relative dates match), then ticking each
 * minute in the browser. Also says whether dates may use the browser's time zone yet.
 */
export function useNow() {
  const now = useState('ui:now', () => Date.now())
  const local = ref(false)
  let timer: ReturnType<typeof setInterval> | undefined
  onMounted(() => {
    now.value = Date.now()
    local.value = true
    timer = setInterval(() => { now.value = Date.now() }, 60_000)
  })
  onBeforeUnmount(() => { if (timer) clearInterval(timer) })
  return { now, local }
}
