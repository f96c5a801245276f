// Names and labels come from files and may hold control characters; written raw to a terminal they can
// clear the screen, move the cursor or retitle the window. Text for people and CSV show them escaped;
// JSON keeps them exactly, as \u escapes (JSON.stringify escapes C0 itself; C1 is added here).

/** C0 controls, DEL, C1 controls (Unicode category Cc) and the bidirectional embedding/override/isolate controls. */
/* eslint-disable no-control-regex -- matching control characters is the point here */
const CONTROLS = /[\u0000-\u001f\u007f-\u009f\u202a-\u202e\u2066-\u2069]/g;
const CONTROLS_TEST = /[\u0000-\u001f\u007f-\u009f\u202a-\u202e\u2066-\u2069]/;
/** The same, but line feeds and tabs pass (multi-line text for people). */
const CONTROLS_BUT_LINES = /[\u0000-\u0008\u000b-\u001f\u007f-\u009f\u202a-\u202e\u2066-\u2069]/g;
const CONTROLS_BUT_LINES_TEST = /[\u0000-\u0008\u000b-\u001f\u007f-\u009f\u202a-\u202e\u2066-\u2069]/;
/** The same, but carriage returns pass too (file formats with CRLF line ends, such as DXF). */
const CONTROLS_BUT_CRLF = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f-\u009f\u202a-\u202e\u2066-\u2069]/g;
const CONTROLS_BUT_CRLF_TEST = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f-\u009f\u202a-\u202e\u2066-\u2069]/;
/* eslint-enable no-control-regex */
const C1 = /[\u007f-\u009f\u202a-\u202e\u2066-\u2069]/g;
const C1_TEST = /[\u007f-\u009f\u202a-\u202e\u2066-\u2069]/;

function shown(ch: string): string {
  const c = ch.charCodeAt(0);
  return c <= 0xff ? `\\x${c.toString(16).padStart(2, '0')}` : `\\u{${c.toString(16)}}`;
}

/** Every control character as a visible escape (\x1b, \x0a, \u{202e}): for one-line values (names, labels, CSV). */
export function escapeControls(text: string): string {
  return CONTROLS_TEST.test(text) ? text.replace(CONTROLS, shown) : text;
}

/** Control characters escaped, line feeds and tabs kept: for whole blocks of text for people. */
export function escapeControlsKeepLines(text: string): string {
  return CONTROLS_BUT_LINES_TEST.test(text) ? text.replace(CONTROLS_BUT_LINES, shown) : text;
}

/** Control characters escaped, line ends (LF and CRLF) and tabs kept: for text file formats (DXF, SVG, OBJ, STL). */
export function escapeControlsInFile(text: string): string {
  return CONTROLS_BUT_CRLF_TEST.test(text) ? text.replace(CONTROLS_BUT_CRLF, shown) : text;
}

/**
 * Serialized JSON with DEL, the C1 controls and the bidirectional controls written as \u escapes too (they
 * can only occur inside strings, so the value read back is unchanged).
 */
export function jsonSafe(json: string): string {
  return C1_TEST.test(json) ? json.replace(C1, (ch) => `\\u${ch.charCodeAt(0).toString(16).padStart(4, '0')}`) : json;
}
