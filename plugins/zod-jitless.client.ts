import { z } from 'zod'

// The pages' content security policy allows no eval. zod would otherwise probe for it with
// `new Function` on its first parse (caught, but a policy violation all the same) and compile
// schemas with it; without eval it validates the same way, interpreted.
export default defineNuxtPlugin({
  name: 'zod-jitless',
  enforce: 'pre',
  setup () {
    z.config({ jitless: true })
  },
})
