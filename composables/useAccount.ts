import type { AccountProfile } from '#shared/types/account'

/** The signed-in person's own profile (GET /api/account). */
export function useAccount() {
  return useFetch<AccountProfile>('/api/account', { key: 'account' })
}
