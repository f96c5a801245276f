// The text of a DXF file's bytes, apart from the reader so the main process can use it without the rest.
/** $DWGCODEPAGE values (DXF reference; common practice) as WHATWG encoding labels. */
const CODE_PAGES: Record<string, string> = {
  ANSI_874: 'windows-874', ANSI_932: 'shift_jis', ANSI_936: 'gbk', ANSI_949: 'euc-kr', ANSI_950: 'big5',
  ANSI_1250: 'windows-1250', ANSI_1251: 'windows-1251', ANSI_1252: 'windows-1252', ANSI_1253: 'windows-1253',
  ANSI_1254: 'windows-1254', ANSI_1255: 'windows-1255', ANSI_1256: 'windows-1256', ANSI_1257: 'windows-1257', ANSI_1258: 'windows-1258',
};

/**
 * The text of a DXF file's bytes. Files of AutoCAD 2007 and later are UTF-8; older ones are in the code page
 * their header names ($DWGCODEPAGE), else Windows-1252 is taken. Pure: TextDecoder is part of the language's
 * platform, not I/O.
 */
export function decodeDxf(bytes: Uint8Array): { text: string; encoding: string } {
  try {
    return { text: new TextDecoder('utf-8', { fatal: true }).decode(bytes).replace(/^\uFEFF/, ''), encoding: 'utf-8' };
  } catch {
    const head = new TextDecoder('latin1').decode(bytes.subarray(0, 65536));
    const m = /\$DWGCODEPAGE\s*\r?\n\s*3\s*\r?\n\s*(\S+)/i.exec(head);
    let label = (m && CODE_PAGES[m[1].toUpperCase()]) ?? 'windows-1252';
    let decoder: TextDecoder;
    try {
      decoder = new TextDecoder(label);
    } catch {
      label = 'windows-1252';
      decoder = new TextDecoder(label);
    }
    return { text: decoder.decode(bytes), encoding: label };
  }
}

