// How each long-running process of the stack starts and stops: `start` returns
// the function that closes what it opened; a signal runs it, a failed start exits 1.
export function runProcess(name: string, start: () => Promise<() => Promise<unknown>>): void {
  // A promise nobody awaited that fails (a database call during an outage, say) is logged;
  // it must not take down a process that serves everyone else.
  process.on('unhandledRejection', (reason) => console.error(`[${name}] unhandled rejection:`, reason));
  start().then(
    (close) => {
      const stop = () => void close().finally(() => process.exit(0));
      process.once('SIGINT', stop);
      process.once('SIGTERM', stop);
    },
    (err) => {
      console.error(`[${name}] could not start:`, err);
      process.exit(1);
    },
  );
}
