type Level = 'debug' | 'info' | 'warn' | 'error';
const order: Record<Level, number> = { debug: 10, info: 20, warn: 30, error: 40 };

// Tests keep the console for failures; COMOVING_LOG_LEVEL overrides.
const threshold: Level = (process.env.COMOVING_LOG_LEVEL as Level | undefined) ?? (process.env.VITEST ? 'error' : 'info');

/** One JSON line per event on stdout/stderr, so that a request id can be grepped. */
export function log(level: Level, msg: string, fields: Record<string, unknown> = {}): void {
  if (order[level] < order[threshold]) return;
  const line = JSON.stringify({ at: new Date().toISOString(), level, msg, ...fields });
  if (level === 'error' || level === 'warn') console.error(line);
  else console.log(line);
}
