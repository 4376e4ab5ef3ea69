// Paths printed for the user to paste into a shell.

/** A word a POSIX shell reads back as exactly this text: left bare when safe, else in single quotes. */
export function shellQuote(s: string): string {
  if (/^[A-Za-z0-9_@%+=:,./-]+$/.test(s)) return s;
  return `'${s.replace(/'/g, `'\\''`)}'`;
}
