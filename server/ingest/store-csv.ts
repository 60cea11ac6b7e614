import { createHash } from 'node:crypto'
import { finished } from 'node:stream/promises'
import type { Knex } from 'knex'
import { createRowsTable, openCopyIn } from '../rows-store/rows-tables'
import { CopyTextBuilder } from '../rows-store/copy-text'
import { CsvSyntaxError, CsvTokenizer } from './csv-tokenizer'
import { badFile, describeColumn } from './ingest-errors'
import type { TextSniff } from './sniff'
import { TableIntake, type IntakeLimits, type IntakeResult } from './table-intake'
import type { ProgressSink } from './progress-sink'
import { toUtf8 } from './text-decoding'

/** The original bytes could not go to PostgreSQL as they are; store parsed rows instead. */
export class FastPathBlocked extends Error {}

export type CsvMode = 'original-bytes' | 'parsed-rows'

type CopyIn = Awaited<ReturnType<typeof openCopyIn>>

/** Where a file's bytes come from: the file on disk, or an upload still in transfer. */
export interface ByteSource {
  chunks(): AsyncIterable<Buffer>
  /** Exact size on disk, or the size announced by the request while the upload is in transfer. */
  expectedBytes: number
}

const CR = 0x0d
const LF = 0x0a

/**
 * Holds back line breaks at the end of each chunk and releases them only when more data follows,
 * so blank lines at the very end of a file never reach COPY (PostgreSQL would read them as a row).
 */
class TrailingBreaks {
  private held: Buffer[] = []

  take(bytes: Buffer): Buffer[] {
    let end = bytes.length
    while (end > 0 && (bytes[end - 1] === CR || bytes[end - 1] === LF)) end--
    if (end === 0) {
      if (bytes.length) this.held.push(bytes)
      return []
    }
    const out = [...this.held, end === bytes.length ? bytes : bytes.subarray(0, end)]
    this.held = end === bytes.length ? [] : [bytes.subarray(end)]
    return out
  }
}

function syntaxToBadFile(error: CsvSyntaxError, intake: TableIntake, limits: IntakeLimits) {
  const row = error.recordNo
  const name = intake.columnNames?.[error.fieldIndex]
  const where = describeColumn(error.fieldIndex, name)
  switch (error.kind) {
    case 'unterminated-quote':
      return badFile(
        'UNTERMINATED_QUOTE',
        `Row ${row}, ${where}: a quoted value starts here but its closing quote never comes. Check the quotes in that row.`,
        { row, column: name, columnNumber: error.fieldIndex + 1 },
      )
    case 'text-after-quote':
      return badFile(
        'TEXT_AFTER_QUOTE',
        `Row ${row}, ${where}: there is text after the closing quote of a quoted value. Inside quotes, write a quote as two quotes ("").`,
        { row, column: name, columnNumber: error.fieldIndex + 1 },
      )
    case 'field-too-long':
      return intake.fieldTooLong(
        row,
        error.fieldIndex,
        Math.max(error.length, limits.maxFieldChars + 1),
        error.unfinished,
      )
    case 'too-many-fields':
      return row === 1
        ? badFile(
            'TOO_MANY_COLUMNS',
            `The header row has more than ${limits.maxColumns.toLocaleString('en-US')} columns, the most Nestwise accepts. Remove the columns you do not need and upload again.`,
            { row },
          )
        : badFile(
            'RAGGED_ROW',
            `Row ${row} has more values than the header has columns. Check for an extra delimiter, or a value with a delimiter that should be in quotes.`,
            { row },
          )
  }
}

async function waitForDrain(stream: NodeJS.EventEmitter): Promise<void> {
  await new Promise<void>((resolve) => {
    const done = () => {
      stream.off('drain', done)
      stream.off('error', done)
      stream.off('close', done)
      resolve()
    }
    stream.once('drain', done)
    stream.once('error', done)
    stream.once('close', done)
  })
}

export interface StoreCsvResult {
  intake: IntakeResult
  sha256: string
}

/**
 * One pass over a delimited text file: hashes the original bytes, checks or transcodes them to UTF-8, tokenizes, checks and
 * profiles every row, and streams the rows into COPY inside `trx`.
 *
 * 'original-bytes' hands PostgreSQL the file's own bytes (re-encoded to UTF-8 when needed) and lets
 * its CSV reader split them while we check the same bytes here; it throws FastPathBlocked when the
 * file uses something that reader would take differently, and the caller retries with
 * 'parsed-rows', which sends the rows as we parsed them in COPY text format.
 */
export async function storeCsv(
  trx: Knex.Transaction,
  versionId: number,
  source: ByteSource,
  sniff: TextSniff,
  mode: CsvMode,
  limits: IntakeLimits,
  progress: ProgressSink,
): Promise<StoreCsvResult> {
  const intake = new TableIntake(limits, sniff.decimalMark)
  const hash = createHash('sha256')
  const copyText = new CopyTextBuilder()
  const tokenizer = new CsvTokenizer({
    delimiter: sniff.delimiter,
    maxFieldChars: limits.maxFieldChars,
    maxFieldsPerRow: limits.maxColumns + 1,
    onRow: (row, recordNo) => {
      const isHeader = intake.columnNames === null
      intake.addCsvRow(row, recordNo)
      if (mode === 'parsed-rows' && !isHeader && copyText.addRow(row) >= 0)
        throw badFile(
          'BINARY_FILE',
          `Row ${recordNo} contains a NUL character: the file holds binary data, not only text.`,
          { row: recordNo },
        )
    },
  })
  const utf8 = toUtf8(sniff.encoding)
  const trailing = new TrailingBreaks()
  // Held in an object: the closures below assign them, which plain locals would hide from type narrowing.
  const state: { copy: CopyIn | null; copyError: Error | null } = { copy: null, copyError: null }
  let pending: Buffer[] = []
  let bytesRead = 0
  let skipBom = sniff.bomBytes
  let reserved = false
  const fileSize = source.expectedBytes

  /** Runs a tokenizer step, turning a syntax error into a message that names row and column. */
  const tokenize = (step: () => void) => {
    try {
      step()
    } catch (error) {
      throw error instanceof CsvSyntaxError ? syntaxToBadFile(error, intake, limits) : error
    }
  }
  // Written chunks are not awaited right away: PostgreSQL stores chunk k while we parse chunk k + 1.
  let draining: Promise<void> | null = null
  const flush = async () => {
    if (!state.copy && intake.columnNames) {
      await createRowsTable(trx, versionId, intake.columnNames.length)
      const copy = await openCopyIn(
        trx,
        versionId,
        intake.columnNames.length,
        mode === 'original-bytes' ? { kind: 'csv', delimiter: sniff.delimiter } : { kind: 'text' },
      )
      copy.on('error', (error: Error) => {
        state.copyError ??= error
      })
      state.copy = copy
    }
    const copy = state.copy
    if (!copy || state.copyError) {
      if (state.copyError) pending = []
      return
    }
    for (const buffer of pending) {
      if (draining) {
        await draining
        draining = null
      }
      if (state.copyError) break
      if (!copy.write(buffer)) draining = waitForDrain(copy)
    }
    pending = []
  }

  try {
    for await (const chunk of source.chunks()) {
      hash.update(chunk)
      bytesRead += chunk.length
      let bytes = chunk
      if (skipBom) {
        bytes = chunk.subarray(skipBom)
        skipBom = 0
      }
      const utf8Bytes = utf8.write(bytes)
      tokenize(() => tokenizer.push(utf8Bytes))
      if (!reserved && intake.dataRows >= 100) {
        // Rows so far per byte so far, with a little slack, predicts the whole file closely.
        intake.reserveRows(Math.ceil(((intake.dataRows * fileSize) / bytesRead) * 1.02))
        reserved = true
      }
      if (mode === 'original-bytes') {
        if (tokenizer.fastPathBlocker) throw new FastPathBlocked(tokenizer.fastPathBlocker)
        pending.push(...trailing.take(utf8Bytes))
      } else if (copyText.length) pending.push(copyText.take())
      await flush()
      progress.update({ phase: 'storing', bytesRead, rowsStored: intake.dataRows })
      progress.signal?.throwIfAborted()
    }
    tokenize(() => {
      tokenizer.push(utf8.end())
      tokenizer.end()
    })
    if (mode === 'original-bytes' && tokenizer.fastPathBlocker)
      throw new FastPathBlocked(tokenizer.fastPathBlocker)
    if (mode === 'parsed-rows' && copyText.length) pending.push(copyText.take())
    await flush()
    if (draining) await draining
    const stream = state.copy
    if (stream && !state.copyError) stream.end()
    // Profiles and the suggestion are worked out while PostgreSQL stores the last rows.
    const result = intake.finish()
    if (!stream) throw new Error('no rows table was created')
    if (!state.copyError) {
      await finished(stream).catch((error: Error) => {
        state.copyError ??= error
      })
    }
    if (state.copyError) {
      if (mode === 'original-bytes')
        throw new FastPathBlocked(`PostgreSQL refused the file as it is: ${state.copyError.message}`)
      throw state.copyError
    }
    if (stream.rowCount !== result.rowCount) {
      const message = `COPY stored ${stream.rowCount} rows where the file has ${result.rowCount}`
      if (mode === 'original-bytes') throw new FastPathBlocked(message)
      throw new Error(message)
    }
    return { intake: result, sha256: hash.digest('hex') }
  } catch (error) {
    const open = state.copy
    if (open && !open.writableFinished) {
      if (open.writableEnded) {
        // Already ended (a check on the whole file failed): let the COPY finish; the rollback undoes it.
        await finished(open).catch(() => {})
      } else {
        // Abandon the COPY (pg-copy-streams sends CopyFail); the caller's rollback follows on the same connection.
        open.destroy()
        await new Promise((resolve) => setImmediate(resolve))
      }
    }
    throw error
  }
}
