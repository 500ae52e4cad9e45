/** Number formatting shared by the text tables of the CLI and the HTML reports. */

/** A value in waves or a Strehl ratio: 4 decimals, or 3 significant digits in exponent form when tiny. */
export function formatValue(v: number | null | undefined): string {
  if (v === null || v === undefined || Number.isNaN(v)) return '—';
  if (!Number.isFinite(v)) return v > 0 ? '∞' : '−∞';
  if (v !== 0 && Math.abs(v) < 1e-4) return v.toExponential(2);
  return v.toFixed(4);
}

/** A signed difference: always with its sign. */
export function formatSigned(v: number | null | undefined): string {
  const s = formatValue(v);
  return v !== null && v !== undefined && v > 0 ? `+${s}` : s;
}

export function formatZ(z: number | null | undefined): string {
  if (z === null || z === undefined || Number.isNaN(z)) return '—';
  if (!Number.isFinite(z)) return z > 0 ? '+∞' : '−∞';
  return `${z > 0 ? '+' : ''}${z.toFixed(2)}`;
}

/** "2025-03-04 09:30Z" from an ISO string (minutes, UTC). */
export function formatWhen(iso: string): string {
  return iso.length >= 16 ? `${iso.slice(0, 10)} ${iso.slice(11, 16)}Z` : iso;
}

/** Left-aligned text table with a header and a rule line. */
export function textTable(header: readonly string[], rows: readonly (readonly string[])[], rightAlign: readonly boolean[] = []): string {
  const widths = header.map((h, c) => Math.max([...h].length, ...rows.map((r) => [...(r[c] ?? '')].length)));
  const pad = (s: string, c: number) => {
    const gap = ' '.repeat(Math.max(0, widths[c] - [...s].length));
    return rightAlign[c] ? gap + s : s + gap;
  };
  const line = (r: readonly string[]) => r.map((s, c) => pad(s ?? '', c)).join('  ').trimEnd();
  return [line(header), widths.map((w) => '─'.repeat(w)).join('  '), ...rows.map(line)].join('\n');
}
