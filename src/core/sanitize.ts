/**
 * Echoing user text in messages: every message psibox prints is one line,
 * so a value is shown with its control characters escaped (a newline as \n,
 * others as \xNN or \uNNNN) and cut to about 60 characters, with the length
 * of what was left out, so a 10 MB string never comes back in full.
 */

/** Longest echo of a value in a message, in characters (before the "…" note). */
export const ECHO_LIMIT = 60;

const NAMED: Record<string, string> = { "\n": "\\n", "\r": "\\r", "\t": "\\t", "\b": "\\b", "\f": "\\f", "\v": "\\v", "\0": "\\0" };

/** Escape control characters (C0, DEL, C1, line and paragraph separators, bidi controls) of `text`. */
export function escapeControls(text: string): string {
  // eslint-disable-next-line no-control-regex
  return text.replace(/[\u0000-\u001f\u007f-\u009f\u2028\u2029\u200e\u200f\u202a-\u202e\u2066-\u2069]/g, (c) => {
    const named = NAMED[c];
    if (named) return named;
    const code = c.charCodeAt(0);
    return code < 0x100 ? `\\x${code.toString(16).padStart(2, "0")}` : `\\u${code.toString(16).padStart(4, "0")}`;
  });
}

/** `text` with controls escaped and cut to `limit` characters, saying how many more there were. */
export function shorten(text: string, limit = ECHO_LIMIT): string {
  const cut = text.length > limit ? text.slice(0, limit) : text;
  const escaped = escapeControls(cut);
  return text.length > limit ? `${escaped}… (${text.length} characters)` : escaped;
}

/** A value as it is echoed in a message: strings in double quotes, others as JSON, all shortened. */
export function quoteValue(value: unknown): string {
  if (typeof value === "string") return `"${shorten(value)}"`;
  if (typeof value === "number" || typeof value === "boolean" || value === null || value === undefined) return String(value);
  if (typeof value === "bigint") return `${value}`;
  let json: string | undefined;
  try {
    json = JSON.stringify(value);
  } catch {
    json = undefined;
  }
  return shorten(json ?? Object.prototype.toString.call(value));
}

/** A file name as it is echoed in a message (controls escaped, long names shortened in the middle). */
export function fileName(name: string): string {
  const escaped = escapeControls(name);
  if (escaped.length <= 2 * ECHO_LIMIT) return escaped;
  return `${escaped.slice(0, ECHO_LIMIT)}…${escaped.slice(-ECHO_LIMIT)}`;
}

/** Make any message one line: controls escaped, and at most `limit` characters. */
export function oneLine(message: string, limit = 400): string {
  const escaped = escapeControls(message);
  return escaped.length > limit ? `${escaped.slice(0, limit)}…` : escaped;
}

/** A word as the user may paste it into a shell: plain words as they are, others in single quotes or $'…' with escapes. */
export function shellWord(word: string): string {
  if (/^[A-Za-z0-9_./+,@=:~-]+$/.test(word)) return word;
  if (!/[\u0000-\u001f\u007f]/.test(word)) return `'${word.replace(/'/g, `'\\''`)}'`;
  return `$'${escapeControls(word.replace(/\\/g, "\\\\").replace(/'/g, "\\'"))}'`;
}
