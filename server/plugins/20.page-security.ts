// Pages get a content security policy made for their own HTML (the inline start-up script is
// allowed by its hash), and no "x-powered-by" header. Development keeps Vite's hot reload, which
// needs eval and a socket, so the policy is set in built apps only.
export default defineNitroPlugin((nitroApp) => {
  nitroApp.hooks.hook('render:response', (response) => {
    const headers = (response.headers ??= {}) as Record<string, string>
    for (const name of Object.keys(headers)) if (name.toLowerCase() === 'x-powered-by') delete headers[name]
    const type = String(headers['content-type'] ?? '')
    if (import.meta.dev || !type.startsWith('text/html') || typeof response.body !== 'string') return
    headers['content-security-policy'] = pagePolicy(response.body)
  })
})
