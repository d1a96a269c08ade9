/**
 * A small reader of Internet messages (RFC 5322) for the SMTP fake: the header fields it lists
 * (From, To, Cc, Subject), with folded lines (RFC 5322 §2.2.3) and encoded words (RFC 2047, B and
 * Q), and the plain-text body: a single text/plain part, or the first text/plain part of a
 * multipart message (RFC 2046), decoded from quoted-printable or base64 (RFC 2045) and from its
 * charset. Enough for what nodemailer writes; not a general MIME library.
 */

export interface ParsedMessage {
  from: string;
  to: string[];
  cc: string[];
  subject: string;
  text: string;
  messageId: string | null;
}

type Headers = Map<string, string[]>;

/** Splits header block and body at the first empty line. */
function splitHeaderBody(raw: string): { head: string; body: string } {
  const m = /\r?\n\r?\n/.exec(raw);
  if (!m) return { head: raw, body: '' };
  return { head: raw.slice(0, m.index), body: raw.slice(m.index + m[0].length) };
}

function parseHeaders(head: string): Headers {
  const out: Headers = new Map();
  const lines = head.split(/\r?\n/);
  const fields: string[] = [];
  for (const line of lines) {
    if (/^[ \t]/.test(line) && fields.length)
      fields[fields.length - 1] += line; // unfold: drop the CRLF only
    else if (line.length) fields.push(line);
  }
  for (const f of fields) {
    const i = f.indexOf(':');
    if (i <= 0) continue;
    const name = f.slice(0, i).trim().toLowerCase();
    const value = f.slice(i + 1).trim();
    const list = out.get(name) ?? [];
    list.push(value);
    out.set(name, list);
  }
  return out;
}

const first = (h: Headers, name: string) => h.get(name)?.[0] ?? '';

function decodeBytes(bytes: Uint8Array, charset: string): string {
  const cs = charset.trim().toLowerCase() || 'utf-8';
  try {
    return new TextDecoder(cs === 'us-ascii' ? 'utf-8' : cs).decode(bytes);
  } catch {
    return new TextDecoder('utf-8').decode(bytes);
  }
}

/** Quoted-printable (RFC 2045 §6.7) of a byte string (one character per byte) to bytes; soft line breaks removed. */
export function decodeQuotedPrintable(s: string): Uint8Array {
  const text = s.replace(/=\r?\n/g, '');
  const out: number[] = [];
  for (let i = 0; i < text.length; i++) {
    const c = text[i];
    if (c === '=' && /^[0-9A-Fa-f]{2}$/.test(text.slice(i + 1, i + 3))) {
      out.push(parseInt(text.slice(i + 1, i + 3), 16));
      i += 2;
    } else {
      out.push(text.charCodeAt(i) & 0xff); // the input is a byte string (latin1)
    }
  }
  return Uint8Array.from(out);
}

/** RFC 2047 encoded words (=?charset?B|Q?text?=); whitespace between two encoded words is dropped. */
export function decodeEncodedWords(value: string): string {
  const re = /=\?([^?\s]+)\?([BbQq])\?([^?\s]*)\?=/g;
  const joined = value.replace(/(=\?[^?\s]+\?[BbQq]\?[^?\s]*\?=)\s+(?==\?)/g, '$1');
  return joined.replace(re, (_m, charset: string, enc: string, text: string) => {
    const cs = charset.split('*')[0]; // RFC 2231 language suffix
    if (enc.toUpperCase() === 'B') return decodeBytes(Buffer.from(text, 'base64'), cs);
    return decodeBytes(decodeQuotedPrintable(text.replace(/_/g, ' ')), cs);
  });
}

/** A header parameter (charset, boundary) of a Content-Type value. */
function param(value: string, name: string): string | null {
  const re = new RegExp(`;\\s*${name}\\s*=\\s*(?:"((?:[^"\\\\]|\\\\.)*)"|([^;\\s]+))`, 'i');
  const m = re.exec(value);
  if (!m) return null;
  return m[1] !== undefined ? m[1].replace(/\\(.)/g, '$1') : m[2];
}

/** The addresses of an address-list header: "A <a@x>, "B, C" <b@x>, c@x" → [a@x, b@x, c@x]. */
export function addresses(value: string): string[] {
  const out: string[] = [];
  let cur = '';
  let quoted = false;
  let angle = 0;
  const flush = () => {
    const part = cur.trim();
    cur = '';
    if (!part) return;
    const m = /<([^<>]*)>/.exec(part);
    const addr = (m ? m[1] : part.replace(/\(.*?\)/g, '')).trim();
    if (addr.includes('@')) out.push(addr.toLowerCase());
  };
  for (const c of value) {
    if (c === '"' && angle === 0) quoted = !quoted;
    else if (!quoted && c === '<') angle++;
    else if (!quoted && c === '>') angle = Math.max(0, angle - 1);
    if (c === ',' && !quoted && angle === 0) flush();
    else cur += c;
  }
  flush();
  return out;
}

function bodyText(headers: Headers, body: string, depth = 0): string | null {
  const type = first(headers, 'content-type') || 'text/plain; charset=us-ascii';
  const mime = type.split(';')[0].trim().toLowerCase();
  if (mime.startsWith('multipart/')) {
    const boundary = param(type, 'boundary');
    if (!boundary || depth > 5) return null;
    const esc = boundary.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
    const parts = body.split(new RegExp(`(?:^|\\r?\\n)--${esc}(?:--)?[ \\t]*(?:\\r?\\n|$)`));
    // parts[0] is the preamble, the last may be the epilogue
    for (const part of parts.slice(1)) {
      if (!part.trim()) continue;
      const { head, body: b } = splitHeaderBody(part);
      const h = parseHeaders(head);
      if (/attachment/i.test(first(h, 'content-disposition'))) continue;
      const t = bodyText(h, b, depth + 1);
      if (t !== null) return t;
    }
    return null;
  }
  if (mime !== 'text/plain') return null;
  const charset = param(type, 'charset') ?? 'us-ascii';
  const cte = first(headers, 'content-transfer-encoding').toLowerCase();
  let bytes: Uint8Array;
  if (cte === 'quoted-printable') bytes = decodeQuotedPrintable(body);
  else if (cte === 'base64') bytes = Buffer.from(body.replace(/\s+/g, ''), 'base64');
  else bytes = Buffer.from(body, 'latin1'); // 7bit / 8bit / binary: the bytes as received
  return decodeBytes(bytes, charset).replace(/\r\n/g, '\n').replace(/\n$/, '');
}

/** Reads a message as received over SMTP (DATA, dot-unstuffed). */
export function parseMessage(raw: Buffer): ParsedMessage {
  // latin1 keeps one character per byte, so 8bit bodies decode by their own charset later
  const { head, body } = splitHeaderBody(raw.toString('latin1'));
  const headers = parseHeaders(head);
  const headerText = (name: string) =>
    decodeEncodedWords(decodeBytes(Buffer.from(first(headers, name), 'latin1'), 'utf-8'));
  const list = (name: string) => (headers.get(name) ?? []).flatMap((v) => addresses(decodeEncodedWords(v)));
  const from = list('from')[0] ?? headerText('from');
  return {
    from,
    to: list('to'),
    cc: list('cc'),
    subject: headerText('subject'),
    text: bodyText(headers, body) ?? '',
    messageId: first(headers, 'message-id') || null,
  };
}
