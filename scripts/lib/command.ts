// How the long-running commands (npm test, npm run bench) end: the exit code of their main(), their
// clean-up run once whether main ends, fails or is stopped with Ctrl-C.

export function runCommand(main: () => Promise<number>, opts: { cleanUp: () => void; onError: (err: Error) => void }): void {
  process.on('SIGINT', () => {
    opts.cleanUp();
    process.exit(130);
  });
  main()
    .then((code) => {
      opts.cleanUp();
      process.exit(code);
    })
    .catch((err: Error) => {
      opts.onError(err);
      opts.cleanUp();
      process.exit(1);
    });
}
