import type { ReviewBody } from '#shared/schemas/review'

/**
 * Saving a review from a take page: one save at a time, the server's message (and the note it
 * concerns) on failure, a confirmation once saved and the take reloaded.
 */
export function useTakeReview(takeId: () => number | null | undefined, reload: () => Promise<unknown>) {
  const saving = ref(false)
  const error = ref<string | null>(null)
  const errorNote = ref<number | null>(null)
  const message = ref<string | null>(null)

  async function save(body: ReviewBody) {
    const id = takeId()
    if (id == null || saving.value) return
    saving.value = true
    error.value = null
    errorNote.value = null
    message.value = null
    try {
      const saved = await requestReview(id, body)
      await reload()
      message.value = saved.created ? 'Review saved. The player gets an e-mail.' : 'Your review is updated. The player gets an e-mail.'
    }
    catch (err) {
      const p = apiProblem(err, 'The review could not be saved. Try again.')
      error.value = p.message
      errorNote.value = typeof p.details.noteIndex === 'number' ? p.details.noteIndex : null
    }
    finally {
      saving.value = false
    }
  }

  return { saving, error, errorNote, message, save }
}
