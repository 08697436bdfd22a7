/**
 * The command line over files held in memory, for the command tests: `main(args)` with an
 * Io whose files are a Map (a missing one throws ENOENT like the disk), stdout and stderr
 * collected as text, and a fixed date.
 */
import { main, type Io } from '../../src/cli/main';

export function memoryCli(initial: Record<string, string>, clock: () => number = () => 0) {
  const files = new Map(Object.entries(initial));
  return (args: string[]) => {
    let out = '';
    let err = '';
    const io: Io = {
      out: (t) => (out += t + '\n'),
      err: (t) => (err += t + '\n'),
      readFile: (p) => {
        const t = files.get(p);
        if (t === undefined) throw Object.assign(new Error('no'), { code: 'ENOENT' });
        return t;
      },
      writeFile: (p, t) => files.set(p, t),
      now: () => new Date('2027-01-01T00:00:00Z'),
      clock
    };
    return { code: main(args, io), out, err, files };
  };
}
