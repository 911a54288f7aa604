// `driftline <command>`: the engine on the command line, for scripts and for checking numbers.
export interface CliIo {
  stdout: (s: string) => void
  stderr: (s: string) => void
}

const USAGE = `Usage: driftline <command> [options]

Commands:
  targets   Target pitch of every note of a drill in a tuning system
  analyze   Measure a take against a drill and score every held chord

Run "driftline <command> --help" for the options of a command.
`

const COMMANDS: Record<string, () => Promise<{ run: (argv: string[], io: CliIo) => Promise<number> }>> = {
  targets: () => import('./targets'),
  analyze: () => import('./analyze'),
}

/** Runs one command and returns the process exit code. */
export async function main(argv: string[], io: CliIo = {
  stdout: s => process.stdout.write(s),
  stderr: s => process.stderr.write(s),
}): Promise<number> {
  const [command, ...rest] = argv
  if (!command || command === '--help' || command === '-h' || command === 'help') {
    io.stdout(USAGE)
    return command ? 0 : 2
  }
  const load = COMMANDS[command]
  if (!load) {
    io.stderr(`driftline: unknown command "${command}"\n\n${USAGE}`)
    return 2
  }
  const mod = await load()
  return mod.run(rest, io)
}
