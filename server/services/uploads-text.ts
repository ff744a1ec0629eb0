// Netlist bytes → text. Netlists are read as UTF-8 (ASCII in practice); bytes that
// are not valid UTF-8 become U+FFFD, as the WHATWG Encoding Standard's decoder does,
// and are reported once per file with the place of the first one. NUL, valid UTF-8
// but no character of any netlist, becomes U+FFFD too: PostgreSQL text and jsonb
// cannot hold it, so a message quoting a name with a NUL in it could not be stored.
// Never throws.

import type { RunDiagnostic } from '../../shared/api/runs';

const strict = new TextDecoder('utf-8', { fatal: true });
const lenient = new TextDecoder('utf-8', { fatal: false });

export interface DecodedText {
  text: string;
  /** Warning about replaced bytes; null when the file is valid UTF-8 without NUL. */
  diagnostic: RunDiagnostic | null;
}

export function decodeNetlistText(path: string, bytes: Uint8Array): DecodedText {
  let text: string;
  try {
    text = strict.decode(bytes);
    if (!text.includes('\0')) return { text, diagnostic: null };
  } catch {
    text = lenient.decode(bytes);
  }
  text = text.replaceAll('\0', '\uFFFD');
  let replaced = 0;
  let first = -1;
  for (let i = 0; i < text.length; i++) {
    if (text.charCodeAt(i) === 0xfffd) {
      replaced++;
      if (first < 0) first = i;
    }
  }
  // A U+FFFD may also have been written literally in the file; the first replacement is still where the trouble starts.
  let line = 1;
  let lineStart = 0;
  for (let i = 0; i < first; i++) {
    if (text.charCodeAt(i) === 10) {
      line++;
      lineStart = i + 1;
    }
  }
  return {
    text,
    diagnostic: {
      severity: 'warning',
      code: 'invalid-utf8',
      message: `${replaced} character${replaced === 1 ? '' : 's'} of this file ${replaced === 1 ? 'is' : 'are'} not valid UTF-8 (or NUL) and ${replaced === 1 ? 'was' : 'were'} read as U+FFFD`,
      hint: 'Save the netlist as UTF-8 (or plain ASCII); names with replaced characters will not match the rest of the design.',
      file: path,
      line,
      column: first - lineStart + 1,
    },
  };
}
