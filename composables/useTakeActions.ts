import type { RescoreBody } from '#shared/schemas/take'
import type { TakeReport } from '#shared/types/take'

type TakeAction = 'reanalyse' | 'withdraw' | 'restore'

const DONE: Record<TakeAction, string> = {
  reanalyse: 'The take is queued for a fresh analysis.',
  withdraw: 'The take is withdrawn. Your director can still restore it.',
  restore: 'The take is restored.',
}

/**
 * What a take page does to its take: score it again against another system (shown, not saved),
 * queue a fresh analysis, withdraw or restore it. One request at a time; each says what became of it.
 */
export function useTakeActions(takeId: () => number | null | undefined, reload: () => Promise<unknown>) {
  const rescored = ref<TakeReport | null>(null)
  const rescoring = ref(false)
  const rescoreError = ref<string | null>(null)
  const busy = ref<TakeAction | null>(null)
  const message = ref<string | null>(null)
  const error = ref<string | null>(null)

  async function rescore(body: RescoreBody) {
    const id = takeId()
    if (id == null || rescoring.value) return
    rescoring.value = true
    rescoreError.value = null
    try {
      rescored.value = (await requestRescore(id, body)).report
    }
    catch (err) {
      rescoreError.value = apiProblem(err, 'The take could not be scored again.').message
    }
    finally {
      rescoring.value = false
    }
  }

  async function act(kind: TakeAction) {
    const id = takeId()
    if (id == null || busy.value) return
    busy.value = kind
    message.value = null
    error.value = null
    try {
      if (kind === 'reanalyse') await requestReanalysis(id)
      else await requestWithdrawal(id, kind === 'withdraw')
      rescored.value = null
      await reload()
      message.value = DONE[kind]
    }
    catch (err) {
      error.value = apiProblem(err, 'That did not work. Try again.').message
    }
    finally {
      busy.value = null
    }
  }

  return { rescored, rescoring, rescoreError, rescore, busy, message, error, act }
}
