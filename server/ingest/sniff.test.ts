import iconv from 'iconv-lite'
import { describe, expect, it } from 'vitest'
import { AppError } from '../errors/app-error'
import { sniffFile } from './sniff'

const sniff = (bytes: Buffer, name = 'data.csv') => sniffFile(bytes, name, bytes.length)

function refusalReason(bytes: Buffer, name = 'data.csv'): unknown {
  try {
    sniff(bytes, name)
  } catch (e) {
    if (e instanceof AppError) return (e.details as { reason: string }).reason
    throw e
  }
  return null
}

describe('sniffFile', () => {
  it('detects delimiters and the decimal comma', () => {
    expect(sniff(Buffer.from('a,b,c\n1,2,3\n'))).toMatchObject({
      delimiter: ',',
      decimalMark: '.',
      encoding: 'utf-8',
    })
    expect(sniff(Buffer.from('a;b\n1,5;2,25\n3;4,0\n'))).toMatchObject({ delimiter: ';', decimalMark: ',' })
    expect(sniff(Buffer.from('a\tb\n1.5\t2\n'), 'x.tsv')).toMatchObject({ delimiter: '\t', decimalMark: '.' })
    expect(sniff(Buffer.from('"a,1";b\n"x,2";3\n'))).toMatchObject({ delimiter: ';' })
  })

  it('detects BOMs, UTF-16 without BOM and Windows-1252', () => {
    expect(sniff(Buffer.from('\ufeffa,b\n1,2\n'))).toMatchObject({ encoding: 'utf-8', bomBytes: 3 })
    const utf16 = Buffer.concat([Buffer.from([0xff, 0xfe]), iconv.encode('a\tb\n1\t2\n', 'utf-16le')])
    expect(sniff(utf16)).toMatchObject({ encoding: 'utf-16le', bomBytes: 2, delimiter: '\t' })
    expect(sniff(iconv.encode('a,b\n1,2\n', 'utf-16le'))).toMatchObject({ encoding: 'utf-16le', bomBytes: 0 })
    expect(sniff(iconv.encode('Länge µm;Zelle\n1,5;é\n', 'windows-1252'))).toMatchObject({
      encoding: 'windows-1252',
      delimiter: ';',
      decimalMark: ',',
    })
  })

  it('refuses files that are not text tables, saying what they are', () => {
    expect(refusalReason(Buffer.alloc(0))).toBe('EMPTY_FILE')
    expect(refusalReason(Buffer.from('PK\u0003\u0004rest'))).toBe('WORKBOOK_AS_TEXT')
    expect(refusalReason(Buffer.from([0xd0, 0xcf, 0x11, 0xe0, 1, 2]))).toBe('OLD_EXCEL_FORMAT')
    expect(refusalReason(Buffer.from('a,b\n'), 'x.xlsx')).toBe('BROKEN_WORKBOOK')
    // An .xlsx saved with a password is an encrypted compound file, not a zip.
    expect(refusalReason(Buffer.from([0xd0, 0xcf, 0x11, 0xe0, 1, 2]), 'x.xlsx')).toBe('ENCRYPTED_WORKBOOK')
    expect(refusalReason(Buffer.from('a,b\n'), 'x.pdf')).toBe('UNSUPPORTED_FILE_TYPE')
    expect(refusalReason(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0, 0, 0, 13, 1, 2, 3, 0, 0]))).toBe(
      'BINARY_FILE',
    )
    expect(sniff(Buffer.from('PK\u0003\u0004rest'), 'book.xlsx')).toEqual({ fileType: 'xlsx' })
  })
})
