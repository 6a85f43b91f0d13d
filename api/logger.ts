// The server's log (pino). LOG_LEVEL sets what reaches the terminal. With PRISMLINE_LOG_FILE the whole
// log from info up (one line a request among it) also goes to that file; npm start sets it to
// .data/logs/server.log and keeps the terminal for warnings and errors unless LOG_LEVEL asks for more.
import { renameSync, statSync } from 'node:fs';
import { levels, multistream, pino, type DestinationStream, type Logger } from 'pino';

const options = {
  base: { app: 'prismline' },
  redact: ['req.headers.authorization', 'req.headers.cookie', 'res.headers["set-cookie"]', '*.password'],
};

/** Past this size the log file is moved to `<file>.1` (replacing the one before) and a new one begun. */
export const LOG_FILE_CAP_BYTES = 20 * 1024 * 1024;
const CAP_CHECK_MS = 60_000;

type FileStream = ReturnType<typeof pino.destination>;

export interface LogFile {
  stream: FileStream;
  /** Moves the file aside when it has passed the cap; answers whether it did. */
  rotateIfFull(): boolean;
}

/** The log file, appended to; it is kept under its cap when opened and once a minute after. */
export function openLogFile(file: string, capBytes = LOG_FILE_CAP_BYTES): LogFile {
  const size = () => {
    try {
      return statSync(file).size;
    } catch {
      return 0;
    }
  };
  if (size() > capBytes) renameSync(file, `${file}.1`);
  const stream = pino.destination({ dest: file, append: true, mkdir: true, sync: false });
  const rotateIfFull = () => {
    if (size() <= capBytes) return false;
    stream.flushSync();
    renameSync(file, `${file}.1`);
    stream.reopen();
    return true;
  };
  setInterval(rotateIfFull, CAP_CHECK_MS).unref();
  return { stream, rotateIfFull };
}

const lower = (a: string, b: string) => ((levels.values[a] ?? Infinity) <= (levels.values[b] ?? Infinity) ? a : b);

/** The server's logger for an environment; `terminal` is where the terminal's share goes (stdout). */
export function createLogger(env: NodeJS.ProcessEnv = process.env, terminal: DestinationStream = process.stdout): Logger {
  const level = env.LOG_LEVEL ?? 'info';
  if (!env.PRISMLINE_LOG_FILE) return pino({ ...options, level }, terminal);
  const file = openLogFile(env.PRISMLINE_LOG_FILE);
  const streams: { level: string; stream: DestinationStream }[] = [{ level: lower(level, 'info'), stream: file.stream }];
  if (level !== 'silent') streams.push({ level, stream: terminal });
  return pino({ ...options, level: lower(level, 'info') }, multistream(streams));
}

export const logger = createLogger();
