import { describe, expect, it } from 'vitest'
import { composeTitle } from '../../../utils/page-title'

// The product's own rule for tab titles: page, then area, then "Driftline", each once. The
// default head title (nuxt.config app.head.title) is the bare product name.
describe('composeTitle', () => {
  it.each([
    [['Users', 'Admin'], 'Users · Admin · Driftline'],
    // A player on /admin: the notice sets no title, so the default "Driftline" reaches the template.
    [['Driftline', 'Admin'], 'Admin · Driftline'],
    [[undefined, 'Admin'], 'Admin · Driftline'],
    [['', 'Admin'], 'Admin · Driftline'],
    [['Admin', 'Admin'], 'Admin · Driftline'],
    [['Ensembles · Driftline', 'Admin'], 'Ensembles · Admin · Driftline'],
    [['Takes'], 'Takes · Driftline'],
    [['Driftline'], 'Driftline'],
    [[null], 'Driftline'],
    [['  '], 'Driftline'],
    [['Members · Harbour Singers'], 'Members · Harbour Singers · Driftline'],
    [['Home · Driftline · Driftline'], 'Home · Driftline'],
  ] as [[string | null | undefined, ...string[]], string][])('%j → %s', ([title, ...areas], out) => {
    expect(composeTitle(title, ...areas)).toBe(out)
  })
})
