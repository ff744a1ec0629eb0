// keepwell — the command line. Each subcommand lives in server/cli/<name>.ts and
// exports `run(args): Promise<number>` returning the process exit code.
//
//   keepwell check FILE… [--deck deck.json] [--top CELL] [--scale F] [--format text|json|sarif] [--output FILE]
//   keepwell stages FILE [--cell CELL] [--deck deck.json] --format json
//   keepwell submit FILE… --server URL --token T --block B [--deck-version ID] [--timeout S] [--format text|json|sarif]

const USAGE = `usage: keepwell <command> [options]

commands:
  check FILE…    check netlists offline against a rule deck (exit 0 clean, 1 errors found, 2 unreadable input)
  stages FILE    print the per-stage transfer report
  submit FILE…   upload netlists to a Keepwell server, wait for the run (exit 0 no unwaived error, 1 unwaived errors, 2 failure)

Run "keepwell <command> --help" for the options of one command.`;

const commands: Record<string, () => Promise<{ run(args: string[]): Promise<number> }>> = {
  check: () => import('./cli/check'),
  stages: () => import('./cli/stages'),
  submit: () => import('./cli/submit'),
};

async function main(argv: string[]): Promise<number> {
  const [name, ...rest] = argv;
  if (!name || name === '--help' || name === '-h' || name === 'help') {
    process.stdout.write(USAGE + '\n');
    return name ? 0 : 2;
  }
  const load = commands[name];
  if (!load) {
    process.stderr.write(`keepwell: unknown command "${name}"\n\n${USAGE}\n`);
    return 2;
  }
  const mod = await load();
  return mod.run(rest);
}

main(process.argv.slice(2)).then(
  (code) => {
    process.exitCode = code;
  },
  (err: unknown) => {
    process.stderr.write(`keepwell: internal error: ${err instanceof Error ? err.message : String(err)}\n`);
    process.exitCode = 2;
  },
);
