import type { Ref } from 'vue'
import type { MyEnsemble } from './useMyEnsembles'

export interface NavItem {
  label: string
  to: string
}

interface NavEntry extends NavItem {
  /** Who sees it; the server refuses the rest anyway. */
  show: 'member' | 'reviewer' | 'admin' | 'mailbox'
}

// Every screen of the product; an entry appears once its page exists and the caller's roles allow it.
const ENTRIES: NavEntry[] = [
  { label: 'Home', to: '/', show: 'member' },
  { label: 'Ensembles', to: '/ensembles', show: 'member' },
  { label: 'Drills', to: '/drills', show: 'member' },
  { label: 'Assignments', to: '/assignments', show: 'member' },
  { label: 'Takes', to: '/takes', show: 'member' },
  { label: 'Review', to: '/review', show: 'reviewer' },
  { label: 'Charts', to: '/charts', show: 'member' },
  { label: 'Admin', to: '/admin', show: 'admin' },
  { label: 'Mailbox', to: '/dev/mailbox', show: 'mailbox' },
]

/** Navigation for the signed-in user: by role, and only to pages that exist. */
export function useNavItems(ensembles: Ref<MyEnsemble[] | null | undefined>) {
  const { user, isAdmin } = useCurrentUser()
  const config = useRuntimeConfig()
  const exists = useRouteExists()
  const reviewer = computed(() => (ensembles.value ?? []).some(e => e.role === 'director' || e.role === 'section_leader'))
  return computed<NavItem[]>(() => {
    if (!user.value) return []
    return ENTRIES.filter((e) => {
      if (!exists(e.to)) return false
      switch (e.show) {
        case 'reviewer': return reviewer.value || isAdmin.value
        case 'admin': return isAdmin.value
        case 'mailbox': return Boolean(config.public.devMailbox)
        default: return true
      }
    }).map(({ label, to }) => ({ label, to }))
  })
}
