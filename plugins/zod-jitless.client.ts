import { z } from 'zod'

// The pages' content security policy allows no eval. zod otherwise probes for it with
// `new Function` (caught, but a policy violation all the same) when a schema is built, and
// compiles with it; without eval it validates the same way, interpreted. Set while this module
// loads, which the app entry does before the first page and its schemas.
z.config({ jitless: true })

export default defineNuxtPlugin({ name: 'zod-jitless', enforce: 'pre', setup () {} })
