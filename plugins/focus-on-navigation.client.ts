// After a page change inside the app, keyboard and screen-reader users start at the new page's
// heading instead of the link they followed (which may no longer exist). The page's title is
// announced politely by <NuxtRouteAnnouncer> in app.vue. The first page load keeps the browser's
// own focus, and a change of only the query or hash (filters, pagination, tabs) keeps focus where
// it is, since the page is the same.
export default defineNuxtPlugin((nuxtApp) => {
  const router = useRouter()
  let pendingFocus = false

  router.afterEach((to, from, failure) => {
    if (failure) return
    if (!from.matched.length) return // the first load
    if (to.path === from.path) return
    pendingFocus = true
  })

  nuxtApp.hook('page:finish', () => {
    if (!pendingFocus) return
    pendingFocus = false
    settleFocus()
  })
})

/**
 * Focuses the new page's heading once its DOM is in place. When the layout changes too (signing
 * in leaves the sign-in layout) the page can be rendered again after `page:finish`, dropping focus
 * to the body: check a few frames more and focus the heading again then. Stops as soon as the
 * person has moved focus somewhere else.
 */
function settleFocus() {
  let tries = 0
  let steady = 0
  let last: HTMLElement | null = null
  const step = () => {
    const active = document.activeElement as HTMLElement | null
    const lost = !active || active === document.body || !active.isConnected
    if (last && !lost && active !== last) return // the person moved on
    const target = pageHeading()
    if (target && (lost || active !== target)) {
      focusQuietly(target)
      last = target
      steady = 0
    }
    else if (target && active === target) steady++
    if (++tries < 30 && steady < 3) setTimeout(step, 50)
  }
  requestAnimationFrame(step)
}

/** The main heading, or failing that the main region. */
function pageHeading(): HTMLElement | null {
  const main = document.getElementById('main')
  return (main?.querySelector('h1') ?? document.querySelector('h1') ?? main) as HTMLElement | null
}

function focusQuietly(target: HTMLElement) {
  if (!target.hasAttribute('tabindex')) target.setAttribute('tabindex', '-1')
  // Headings are focused for orientation only: no focus ring around a title.
  target.classList.add('focus:outline-none')
  target.focus({ preventScroll: true })
}
