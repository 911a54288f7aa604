// The development conveniences (demo scenario, mail catcher and its mailbox) run on a fresh
// machine, and switch themselves off once a real object store or SMTP server is configured,
// unless their own setting turns them on explicitly.

/** A setting that is on, off, or left to decide ('auto', empty): true, false or null. */
export function explicitSwitch (value: unknown): boolean | null {
  if (value === true || value === 'true' || value === 1 || value === '1') return true
  if (value === false || value === 'false' || value === 0 || value === '0') return false
  return null
}

/** Whether an object-store endpoint or an SMTP host is set. */
export function realServicesConfigured (): boolean {
  const c = useRuntimeConfig()
  return Boolean(String(c.storage.endpoint || '')) || Boolean(String(c.mail.host || ''))
}

/** Seed the demo scenario into an empty database? */
export function seedDemoEnabled (): boolean {
  return explicitSwitch(useRuntimeConfig().seedDemo) ?? !realServicesConfigured()
}

/** Run the local mail catcher? Never with an SMTP host. */
export function mailCatcherEnabled (): boolean {
  const c = useRuntimeConfig().mail
  if (String(c.host || '')) return false
  return explicitSwitch(c.embedded) ?? !realServicesConfigured()
}

/** Show the development mailbox? Only while the catcher runs. */
export function devMailboxEnabled (): boolean {
  return mailCatcherEnabled() && (explicitSwitch(useRuntimeConfig().public.devMailbox) ?? true)
}
