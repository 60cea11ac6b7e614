import { closeSync, createReadStream, openSync, readSync, statSync } from 'node:fs'
import type { Readable } from 'node:stream'
import Papa from 'papaparse'
import type { NestedColumns } from '../../shared/stats/types'
import { CliInputError } from './cli-input-error'
import { ColumnCollector, type ColumnSelection } from './column-collector'

export interface ReadColumnsOptions extends ColumnSelection {
  /** Field separator; undefined = detect comma, tab or semicolon from the first rows. */
  delimiter?: string
}

/** A decimal comma rules out the comma as separator, which makes detection reliable. */
function parseConfig(options: ReadColumnsOptions) {
  return {
    delimiter: options.delimiter ?? '',
    delimitersToGuess: options.decimal === ',' ? ['\t', ';'] : [',', '\t', ';'],
    // Rows of only separators (spreadsheet leftovers) are skipped by the collector.
    skipEmptyLines: true,
  }
}

/** Reads a CSV/TSV text held in memory (small inputs, tests). */
export function readColumnsFromText(text: string, options: ReadColumnsOptions): NestedColumns {
  const collector = new ColumnCollector(options)
  const result = Papa.parse<string[]>(text, parseConfig(options))
  collector.addRows(result.data)
  return collector.finish()
}

type Encoding = 'utf8' | 'utf8-bom' | 'utf16le' | 'utf16be'

/** Byte-order marks tell UTF-16 exports (spreadsheet "Unicode text") apart from UTF-8. */
function sniffEncoding(path: string): Encoding {
  const fd = openSync(path, 'r')
  try {
    const head = Buffer.alloc(4)
    const n = readSync(fd, head, 0, 4, 0)
    if (n >= 2 && head[0] === 0xff && head[1] === 0xfe) return 'utf16le'
    if (n >= 2 && head[0] === 0xfe && head[1] === 0xff) return 'utf16be'
    if (n >= 3 && head[0] === 0xef && head[1] === 0xbb && head[2] === 0xbf) return 'utf8-bom'
    return 'utf8'
  } finally {
    closeSync(fd)
  }
}

async function openText(path: string): Promise<Readable> {
  let encoding: Encoding
  try {
    const stats = statSync(path)
    if (stats.isDirectory()) throw new CliInputError(`Cannot read "${path}": it is a folder, not a file.`)
    encoding = sniffEncoding(path)
  } catch (error) {
    if (error instanceof CliInputError) throw error
    const code = (error as NodeJS.ErrnoException).code
    const reason =
      code === 'ENOENT' ? 'no such file' : code === 'EACCES' ? 'permission denied' : (error as Error).message
    throw new CliInputError(`Cannot read "${path}": ${reason}.`)
  }
  // Default 64 KiB reads: papaparse's chunk handling slows down markedly with much larger chunks.
  if (encoding === 'utf8') return createReadStream(path, { encoding: 'utf8' })
  // Skipping the mark's bytes (papaparse strips it only from whole strings) keeps a quoted first header intact.
  if (encoding === 'utf8-bom') return createReadStream(path, { encoding: 'utf8', start: 3 })
  // Decoding through iconv keeps characters split across chunk borders intact; it drops the mark.
  // Loaded only for such files, to keep the start-up of the common case short.
  const { default: iconv } = await import('iconv-lite')
  return createReadStream(path).pipe(iconv.decodeStream(encoding)) as unknown as Readable
}

/**
 * Streams a CSV/TSV file into engine columns: comma, tab or semicolon (detected unless given),
 * quoted fields, CRLF or LF line ends, a UTF-8 byte-order mark, UTF-16 with a byte-order mark,
 * and a decimal comma on request. Memory stays proportional to the columns kept, not the file.
 */
export async function readColumnsFromFile(path: string, options: ReadColumnsOptions): Promise<NestedColumns> {
  const collector = new ColumnCollector(options)
  const input = await openText(path)
  const fileSize = statSync(path).size
  return new Promise((resolve, reject) => {
    let failure: unknown = null
    let first = true
    Papa.parse<string[]>(input as unknown as File, {
      ...parseConfig(options),
      chunk: (results, parser) => {
        if (failure) return
        if (first && results.data.length > 0 && results.meta.cursor > 0) {
          // Rows in the whole file ≈ its size / the first chunk's characters per row (+5 %).
          first = false
          collector.reserve((1.05 * fileSize * results.data.length) / results.meta.cursor)
        }
        try {
          collector.addRows(results.data)
        } catch (error) {
          failure = error
          parser.abort()
        }
      },
      complete: () => {
        if (failure) return reject(failure)
        try {
          resolve(collector.finish())
        } catch (error) {
          reject(error)
        }
      },
      error: (error: Error) => reject(new CliInputError(`Cannot read "${path}": ${error.message}.`)),
    })
  })
}
