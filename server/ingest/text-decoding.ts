import iconv from 'iconv-lite'
import { Utf8Chunks } from './utf8-chunks'

/**
 * The one way Nestwise turns a text file's bytes into UTF-8, for the web's ingest and the command
 * line alike: the encoding comes from sniffFile (byte-order mark, UTF-16 pattern, UTF-8 validity,
 * then jschardet, else Windows-1252), and the bytes after the mark go through toUtf8. A file that
 * looked like UTF-8 in its first bytes but is not throws NotUtf8 on the way; callers read it again
 * as Windows-1252.
 */

/** The file is not valid UTF-8 after all (the sample was); read it again as Windows-1252. */
export class NotUtf8 extends Error {}

/** Turns the file's bytes into UTF-8 bytes (the CSV reader's input and what COPY is told to expect). */
export interface ToUtf8 {
  write(bytes: Buffer): Buffer
  end(): Buffer
}

// Transcoded in small pieces: V8 keeps strings under ~128 KB in its young generation, whose memory
// is reused, while each larger string takes fresh pages (several times slower on this machine).
const DECODE_BYTES = 64 * 1024

export function toUtf8(encoding: string): ToUtf8 {
  if (encoding === 'utf-8') {
    // Already UTF-8: only checked, never copied (a chunk may be joined with a character cut short before it).
    const checker = new Utf8Chunks()
    const valid = (bytes: Buffer | null) => {
      if (bytes === null) throw new NotUtf8()
      return bytes
    }
    return { write: (bytes) => valid(checker.write(bytes)), end: () => valid(checker.end()) }
  }
  const decoder = iconv.getDecoder(encoding)
  return {
    write: (bytes) => {
      const pieces: Buffer[] = []
      for (let at = 0; at < bytes.length; at += DECODE_BYTES)
        pieces.push(Buffer.from(decoder.write(bytes.subarray(at, at + DECODE_BYTES)), 'utf8'))
      return Buffer.concat(pieces)
    },
    end: () => Buffer.from(decoder.end() ?? '', 'utf8'),
  }
}
