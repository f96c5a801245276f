// Reading back the header of an exported table, for the tests that check it.

/** The `# key: value` lines of a table's header (the first of each key). */
export function metadata(text: string): Map<string, string> {
  const out = new Map<string, string>();
  for (const l of text.split('\n')) {
    const m = /^# ([A-Za-z0-9]+): (.*)$/.exec(l);
    if (m && !out.has(m[1])) out.set(m[1], m[2]);
  }
  return out;
}
