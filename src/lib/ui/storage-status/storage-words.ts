/**
 * The words of the storage line: how much this app keeps in the browser, how much room is
 * left, and whether the browser has promised to keep it. Pure functions, so they are tested
 * without a browser.
 */

/** What `navigator.storage` told us; a field is missing when the browser did not say. */
export interface StorageFacts {
  usage?: number;
  quota?: number;
  persisted?: boolean;
}

const UNITS = ['kB', 'MB', 'GB', 'TB'] as const;

/** Bytes in decimal units as people read them: "812 bytes", "1.2 MB", "12 GB". */
export function formatBytes(bytes: number): string {
  if (!Number.isFinite(bytes) || bytes < 0) return 'an unknown amount';
  if (bytes < 1000) return `${Math.round(bytes)} ${Math.round(bytes) === 1 ? 'byte' : 'bytes'}`;
  let value = bytes;
  let unit = -1;
  while (value >= 1000 && unit < UNITS.length - 1) {
    value /= 1000;
    unit += 1;
  }
  // One decimal below 10 ("1.2 MB"), whole numbers above ("12 GB", "340 kB").
  let shown = value < 10 ? Math.round(value * 10) / 10 : Math.round(value);
  if (shown >= 1000 && unit < UNITS.length - 1) {
    shown = 1;
    unit += 1;
  }
  return `${shown} ${UNITS[unit]}`;
}

/** "Stored on this computer: 1.2 MB of about 12 GB available; kept persistently." */
export function storageSentence(facts: StorageFacts): string {
  const { usage, quota, persisted } = facts;
  let amount: string;
  if (usage === undefined) amount = 'Stored on this computer: the browser does not say how much';
  else if (quota === undefined) amount = `Stored on this computer: ${formatBytes(usage)}`;
  else amount = `Stored on this computer: ${formatBytes(usage)} of about ${formatBytes(Math.max(0, quota - usage))} available`;
  const keeping =
    persisted === true
      ? 'kept persistently'
      : persisted === false
        ? 'may be cleared by the browser when space runs low'
        : 'the browser does not say whether it keeps it';
  return `${amount}; ${keeping}.`;
}
