// Which delimiter and decimal mark a lab export uses. European exports write "12,5" with ";" between fields.

export type Delimiter = ',' | ';' | '\t';

export interface CsvDialect {
  delimiter: Delimiter;
  decimalComma: boolean;
}

const candidates: Delimiter[] = [';', '\t', ','];

/** Counts a delimiter per line outside quotes. */
function countsPerLine(lines: string[], delimiter: string): number[] {
  return lines.map((line) => {
    let n = 0;
    let quoted = false;
    for (const ch of line) {
      if (ch === '"') quoted = !quoted;
      else if (ch === delimiter && !quoted) n++;
    }
    return n;
  });
}

/**
 * Picks the delimiter that splits the first lines into the same number of fields, then decides the
 * decimal mark: with ";" or tab, a comma between digits is a decimal comma.
 */
export function detectDialect(text: string): CsvDialect {
  // The first 50 lines decide; 64 kB holds them in any lab export, so a large file is not split whole.
  const lines = text.slice(0, 65_536).replace(/^\uFEFF/, '').split(/\r\n|\n|\r/).filter((l) => l.trim() !== '').slice(0, 50);
  let best: Delimiter = ',';
  let bestScore = -1;
  for (const d of candidates) {
    const counts = countsPerLine(lines, d);
    const first = counts[0] ?? 0;
    if (first === 0) continue;
    const consistent = counts.filter((c) => c === first).length / counts.length;
    const score = consistent * 1000 + first;
    if (score > bestScore) {
      best = d;
      bestScore = score;
    }
  }
  const body = lines.slice(1).join('\n');
  const decimalComma = best !== ',' && /\d,\d/.test(body);
  return { delimiter: best, decimalComma };
}
