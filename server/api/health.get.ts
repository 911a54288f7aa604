// Public: 200 when the database and the object store answer, 503 naming the part that does not.
export default defineEventHandler(async (event) => {
  let starting = false
  await whenReady(20_000).catch(() => { starting = startupState().state === 'starting' })
  const [database, storage] = await Promise.all([
    useDb().raw('select 1').then(() => 'ok' as const, () => 'down' as const),
    useObjectStore().then(s => s.ping()).then(() => 'ok' as const, () => 'down' as const),
  ])
  const ok = !starting && database === 'ok' && storage === 'ok'
  setResponseStatus(event, ok ? 200 : 503)
  setResponseHeader(event, 'Cache-Control', 'no-store')
  return { status: ok ? 'ok' : starting ? 'starting' : 'degraded', database, storage }
})
