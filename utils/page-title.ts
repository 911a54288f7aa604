// The browser tab's title: the page's own title, then the area it sits in, then the product name.

export const SITE_NAME = 'Driftline'
const SEP = ' · '

/**
 * "Users · Admin · Driftline" from a page title and the areas around it, each part once: an empty
 * title, the bare product name (the default head title) or one already ending in it adds nothing.
 */
export function composeTitle(title: string | null | undefined, ...areas: string[]): string {
  let own = (title ?? '').trim()
  while (own.endsWith(`${SEP}${SITE_NAME}`)) own = own.slice(0, -(SEP.length + SITE_NAME.length)).trim()
  const parts: string[] = []
  for (const p of [own, ...areas.map(a => a.trim())]) {
    if (p && p !== SITE_NAME && !parts.includes(p)) parts.push(p)
  }
  return [...parts, SITE_NAME].join(SEP)
}
