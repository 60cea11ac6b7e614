/**
 * A small MIME reader for what the local fake SMTP server receives: headers (with RFC 2047
 * encoded words), multipart bodies, quoted-printable and base64. Enough to show nodemailer's own
 * messages readably in the admin Outbox page; not a general-purpose mail parser.
 */

export interface ParsedMail {
  headers: Map<string, string>
  subject: string | null
  from: string | null
  to: string | null
  messageId: string | null
  text: string | null
  html: string | null
}

interface Part {
  headers: Map<string, string>
  /** Bytes as a latin1 string, so nothing is lost before the charset is known. */
  body: string
}

function splitHeadersAndBody(raw: string): { head: string; body: string } {
  const match = /\r?\n\r?\n/.exec(raw)
  if (!match) return { head: raw, body: '' }
  return { head: raw.slice(0, match.index), body: raw.slice(match.index + match[0].length) }
}

function parseHeaders(head: string): Map<string, string> {
  const headers = new Map<string, string>()
  // Unfold: a line starting with white space continues the previous header.
  const unfolded = head.replace(/\r?\n[ \t]+/g, ' ')
  for (const line of unfolded.split(/\r?\n/)) {
    const colon = line.indexOf(':')
    if (colon <= 0) continue
    const name = line.slice(0, colon).trim().toLowerCase()
    if (!headers.has(name)) headers.set(name, line.slice(colon + 1).trim())
  }
  return headers
}

function bytesToText(latin1: string, charset = 'utf-8'): string {
  const bytes = Buffer.from(latin1, 'latin1')
  try {
    return new TextDecoder(charset).decode(bytes)
  } catch {
    return new TextDecoder('utf-8').decode(bytes)
  }
}

function decodeQuotedPrintable(body: string): string {
  return body
    .replace(/=\r?\n/g, '')
    .replace(/=([0-9A-Fa-f]{2})/g, (_m, hex: string) => String.fromCharCode(parseInt(hex, 16)))
}

function decodeTransfer(body: string, encoding: string | undefined): string {
  switch ((encoding ?? '7bit').toLowerCase()) {
    case 'base64':
      return Buffer.from(body.replace(/\s+/g, ''), 'base64').toString('latin1')
    case 'quoted-printable':
      return decodeQuotedPrintable(body)
    default:
      return body
  }
}

/** RFC 2047: =?charset?B|Q?text?= words; white space between two encoded words is dropped. */
export function decodeHeaderValue(value: string): string {
  const word = /=\?([^?]+)\?([BbQq])\?([^?]*)\?=/g
  const joined = value.replace(/(=\?[^?]+\?[BbQq]\?[^?]*\?=)\s+(?==\?)/g, '$1')
  return joined.replace(word, (_m, charset: string, kind: string, text: string) => {
    const bytes =
      kind.toUpperCase() === 'B'
        ? Buffer.from(text, 'base64').toString('latin1')
        : decodeQuotedPrintable(text.replace(/_/g, ' '))
    return bytesToText(bytes, charset)
  })
}

function parameter(headerValue: string | undefined, name: string): string | undefined {
  if (!headerValue) return undefined
  const match = new RegExp(`;\\s*${name}\\s*=\\s*(?:"([^"]*)"|([^;\\s]+))`, 'i').exec(headerValue)
  return match ? (match[1] ?? match[2]) : undefined
}

function mediaType(headers: Map<string, string>): string {
  return (headers.get('content-type') ?? 'text/plain').split(';')[0].trim().toLowerCase()
}

function splitMultipart(body: string, boundary: string): string[] {
  const parts: string[] = []
  const delimiter = `--${boundary}`
  const lines = body.split(/\r?\n/)
  let current: string[] | null = null
  for (const line of lines) {
    if (line === delimiter || line === `${delimiter}--`) {
      if (current) parts.push(current.join('\r\n'))
      if (line.endsWith('--')) return parts
      current = []
    } else if (current) {
      current.push(line)
    }
  }
  if (current) parts.push(current.join('\r\n'))
  return parts
}

/** Every leaf part, depth first, in the order they appear. */
function leaves(part: Part): Part[] {
  const type = mediaType(part.headers)
  const boundary = parameter(part.headers.get('content-type'), 'boundary')
  if (!type.startsWith('multipart/') || !boundary) return [part]
  return splitMultipart(part.body, boundary).flatMap((chunk) => {
    const { head, body } = splitHeadersAndBody(chunk)
    return leaves({ headers: parseHeaders(head), body })
  })
}

function leafText(part: Part): string {
  const decoded = decodeTransfer(part.body, part.headers.get('content-transfer-encoding'))
  return bytesToText(decoded, parameter(part.headers.get('content-type'), 'charset'))
}

export function parseMail(raw: Buffer | string): ParsedMail {
  const source =
    typeof raw === 'string' ? Buffer.from(raw, 'utf8').toString('latin1') : raw.toString('latin1')
  const { head, body } = splitHeadersAndBody(source)
  const headers = parseHeaders(head)
  let text: string | null = null
  let html: string | null = null
  for (const leaf of leaves({ headers, body })) {
    const disposition = leaf.headers.get('content-disposition') ?? ''
    if (/^attachment/i.test(disposition)) continue
    const type = mediaType(leaf.headers)
    if (type === 'text/plain' && text === null) text = leafText(leaf)
    else if (type === 'text/html' && html === null) html = leafText(leaf)
  }
  const header = (name: string) => {
    const value = headers.get(name)
    return value === undefined ? null : decodeHeaderValue(bytesToText(value))
  }
  return {
    headers,
    subject: header('subject'),
    from: header('from'),
    to: header('to'),
    messageId: headers.get('message-id') ?? null,
    text,
    html,
  }
}
