import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, describe, expect, it } from 'vitest'
import iconv from 'iconv-lite'
import { readColumnsFromFile, readColumnsFromText } from './read-columns'

const selection = { response: 'length', levels: ['lab', 'animal'], conditions: ['treatment'] }

describe('readColumnsFromText', () => {
  it('codes labels in order of appearance and keeps the response as doubles', () => {
    const columns = readColumnsFromText(
      'lab,animal,treatment,length\nA,1,vehicle,10.5\nA,2,NW-117,11\nB,1,vehicle,9.25\n',
      selection,
    )
    expect(Array.from(columns.response)).toEqual([10.5, 11, 9.25])
    expect(columns.response).toBeInstanceOf(Float64Array)
    expect(columns.levels[0]).toMatchObject({ name: 'lab', labels: ['A', 'B'] })
    expect(Array.from(columns.levels[0].codes)).toEqual([0, 0, 1])
    // Animal "1" of lab B gets the same code as animal "1" of lab A: paths are the engine's job.
    expect(Array.from(columns.levels[1].codes)).toEqual([0, 1, 0])
    expect(columns.factors?.[0].labels).toEqual(['vehicle', 'NW-117'])
    expect(columns.responseName).toBe('length')
  })

  it('detects tab and semicolon separators and handles quotes and CRLF', () => {
    const tsv = readColumnsFromText(
      'lab\tanimal\ttreatment\tlength\r\n"A x"\t1\tvehicle\t3\r\nB\t1\tvehicle\t4\r\n',
      selection,
    )
    expect(tsv.levels[0].labels).toEqual(['A x', 'B'])
    expect(Array.from(tsv.response)).toEqual([3, 4])
    const semi = readColumnsFromText(
      'lab;animal;treatment;length\n"A;1";1;"veh""icle";3\nB;1;vehicle;4\n',
      selection,
    )
    expect(semi.levels[0].labels).toEqual(['A;1', 'B'])
    expect(semi.factors?.[0].labels).toEqual(['veh"icle', 'vehicle'])
  })

  it('reads a decimal comma on request, with a semicolon separator detected', () => {
    const columns = readColumnsFromText('lab;animal;treatment;length\nA;1;v;1,5\nA;2;v;-2,25\nB;1;v;3\n', {
      ...selection,
      decimal: ',',
    })
    expect(Array.from(columns.response)).toEqual([1.5, -2.25, 3])
  })

  it('marks missing responses and missing labels as NaN and skips separator-only rows', () => {
    const columns = readColumnsFromText(
      'lab,animal,treatment,length\nA,1,v,NA\nA,,v,2\nA,2,v,\n,,,\nB,1,v,4\n',
      selection,
    )
    expect(columns.response.length).toBe(4)
    expect(Array.from(columns.response).map((v) => Number.isNaN(v))).toEqual([true, true, true, false])
    expect(columns.levels[1].labels).toEqual(['1', '2'])
  })

  it('names the row, line and column of a value that is not a number', () => {
    expect(() => readColumnsFromText('lab,animal,treatment,length\nA,1,v,1\nA,2,v,abc\n', selection)).toThrow(
      'Row 2 (line 3): the response column "length" holds "abc", which is not a number.',
    )
    expect(() => readColumnsFromText('lab;animal;treatment;length\nA;1;v;1,5\n', selection)).toThrow(
      /--decimal ","/,
    )
  })

  it('reads two condition factors and covariates, a missing covariate as NaN', () => {
    const columns = readColumnsFromText(
      [
        'lab,animal,genotype,treatment,soma,age,length',
        'A,1,WT,vehicle,80.5,12,10',
        'A,1,WT,NW-117,NA,12,11',
        'A,2,KO-3,vehicle,79,,12',
        'B,1,KO-3,NW-117,81.25,14,13',
      ].join('\n'),
      {
        response: 'length',
        levels: ['lab', 'animal'],
        conditions: ['genotype', 'treatment'],
        covariates: ['soma', 'age'],
      },
    )
    expect(columns.factors!.map((f) => [f.name, f.labels, Array.from(f.codes)])).toEqual([
      ['genotype', ['WT', 'KO-3'], [0, 0, 1, 1]],
      ['treatment', ['vehicle', 'NW-117'], [0, 1, 0, 1]],
    ])
    expect(columns.covariates!.map((c) => c.name)).toEqual(['soma', 'age'])
    expect(columns.covariates![0].values).toBeInstanceOf(Float64Array)
    expect(Array.from(columns.covariates![0].values)).toEqual([80.5, NaN, 79, 81.25])
    expect(Array.from(columns.covariates![1].values)).toEqual([12, 12, NaN, 14])
    expect(Array.from(columns.response)).toEqual([10, 11, 12, 13])
  })

  it('reads covariates with a decimal comma and leaves out no covariate when none is asked for', () => {
    const columns = readColumnsFromText('lab;animal;soma;length\nA;1;1,5;2\nB;1;-0,25;3\n', {
      response: 'length',
      levels: ['lab', 'animal'],
      covariates: ['soma'],
      decimal: ',',
    })
    expect(Array.from(columns.covariates![0].values)).toEqual([1.5, -0.25])
    expect(
      readColumnsFromText('lab,length\nA,1\n', { response: 'length', levels: ['lab'] }),
    ).not.toHaveProperty('covariates')
  })

  it('names the row, line and column of a covariate that holds text', () => {
    const text = 'lab,animal,soma,length\nA,1,80,1\nA,2,80,2\nA,3,large,3\n'
    expect(() =>
      readColumnsFromText(text, { response: 'length', levels: ['lab', 'animal'], covariates: ['soma'] }),
    ).toThrow('Row 3 (line 4): the covariate column "soma" holds "large", which is not a number.')
  })

  it('lists the available columns when one is missing', () => {
    expect(() => readColumnsFromText('lab,mouse,treatment,length\nA,1,v,1\n', selection)).toThrow(
      'Column "animal" not found. Available columns: lab, mouse, treatment, length.',
    )
  })

  it('rejects a column used twice, a duplicated header and an empty table', () => {
    expect(() =>
      readColumnsFromText('lab,length\nA,1\n', { response: 'length', levels: ['lab', 'length'] }),
    ).toThrow(/used twice/)
    expect(() =>
      readColumnsFromText('lab,soma,length\nA,1,1\n', {
        response: 'length',
        levels: ['lab'],
        conditions: ['soma'],
        covariates: ['soma'],
      }),
    ).toThrow(
      'The column "soma" is used twice; response, levels, conditions and covariates must be different columns.',
    )
    expect(() =>
      readColumnsFromText('lab,lab,length\nA,B,1\n', { response: 'length', levels: ['lab'] }),
    ).toThrow(/more than once/)
    expect(() => readColumnsFromText('lab,length\n', { response: 'length', levels: ['lab'] })).toThrow(
      /no data rows/,
    )
    expect(() => readColumnsFromText('', { response: 'length', levels: ['lab'] })).toThrow(/empty/)
  })

  it('grows past its initial capacity without losing rows', () => {
    const lines = ['lab,length']
    for (let i = 0; i < 5000; i++) lines.push(`L${i % 7},${i}`)
    const columns = readColumnsFromText(lines.join('\n'), { response: 'length', levels: ['lab'] })
    expect(columns.response.length).toBe(5000)
    expect(columns.response[4999]).toBe(4999)
    expect(columns.levels[0].codes[4999]).toBe(4999 % 7)
  })
})

describe('readColumnsFromFile', () => {
  const folder = mkdtempSync(join(tmpdir(), 'nestwise-read-'))
  afterAll(() => rmSync(folder, { recursive: true, force: true }))
  const text = 'lab,animal,treatment,length\r\nA,1,vehicle,1.5\r\nA,2,NW-117,2.5\r\n'

  it('strips a UTF-8 byte-order mark from the first header name', async () => {
    const path = join(folder, 'bom.csv')
    writeFileSync(path, '\uFEFF' + text)
    const columns = await readColumnsFromFile(path, selection)
    expect(Array.from(columns.response)).toEqual([1.5, 2.5])
    expect(columns.levels[0].labels).toEqual(['A'])
    const quoted = join(folder, 'bom-quoted.csv')
    writeFileSync(quoted, '\uFEFF"lab","animal",treatment,length\nA,1,v,3\n')
    expect((await readColumnsFromFile(quoted, selection)).levels[0].name).toBe('lab')
  })

  it('decodes UTF-16 little-endian files with a byte-order mark', async () => {
    const path = join(folder, 'utf16.tsv')
    writeFileSync(
      path,
      iconv.encode('lab\tanimal\ttreatment\tlength\nÄ\t1\tv\t3\n', 'utf16le', { addBOM: true }),
    )
    const columns = await readColumnsFromFile(path, selection)
    expect(columns.levels[0].labels).toEqual(['Ä'])
    expect(Array.from(columns.response)).toEqual([3])
  })

  it('keeps multi-byte characters intact across read chunks', async () => {
    const lines = ['lab,animal,treatment,length']
    for (let i = 0; i < 20000; i++) lines.push(`Läb-ü${i % 3},m${i % 11},β,${i}`)
    const path = join(folder, 'long.csv')
    writeFileSync(path, lines.join('\n'))
    const columns = await readColumnsFromFile(path, selection)
    expect(columns.response.length).toBe(20000)
    expect(columns.levels[0].labels).toEqual(['Läb-ü0', 'Läb-ü1', 'Läb-ü2'])
    expect(columns.factors?.[0].labels).toEqual(['β'])
  })

  it('reserves room from the first chunk and still reads a file longer than estimated', async () => {
    // Long rows first, short rows later: the estimate from the first chunk is too small and the columns must grow.
    const lines = ['lab,animal,treatment,length,soma']
    for (let i = 0; i < 60000; i++)
      lines.push(
        i >= 30000
          ? `A,${i % 9},v,${i},${i % 13}`
          : `Lab-with-a-much-longer-name-${i % 4},animal-${i % 9},vehicle,${i},${i % 13}`,
      )
    const path = join(folder, 'uneven.csv')
    writeFileSync(path, lines.join('\n'))
    const columns = await readColumnsFromFile(path, { ...selection, covariates: ['soma'] })
    expect(columns.response.length).toBe(60000)
    expect(columns.covariates![0].values.length).toBe(60000)
    expect(columns.covariates![0].values[59999]).toBe(59999 % 13)
    expect(columns.covariates![0].values[29999]).toBe(29999 % 13)
    expect(columns.levels.map((l) => l.codes.length)).toEqual([60000, 60000])
    expect(columns.factors![0].codes.length).toBe(60000)
    expect(columns.response[59999]).toBe(59999)
    expect(columns.levels[0].labels[columns.levels[0].codes[59999]]).toBe('A')
    expect(columns.levels[0].labels[columns.levels[0].codes[29999]]).toBe('Lab-with-a-much-longer-name-3')
  })

  it('reads a Windows-1252, semicolon, decimal-comma export as the web upload does', async () => {
    // The same fixture the upload test reads (tests/integration/datasets-encodings.test.ts).
    const path = join('tests', 'fixtures', 'encodings', 'windows1252-semicolon-decimal-comma.csv')
    const columns = await readColumnsFromFile(path, {
      response: 'Neuritenlänge µm',
      levels: ['Labor', 'Maus'],
      conditions: ['Behandlung'],
    })
    expect(columns.responseName).toBe('Neuritenlänge µm')
    expect(Array.from(columns.response.subarray(0, 4))).toEqual([100, 101.25, 102.5, 103.75])
    expect(columns.factors?.[0].labels).toEqual(['Vehikel', 'NW-117'])
  })

  it('reads again as Windows-1252 a file that is UTF-8 only in its first bytes', async () => {
    const head = 'lab,animal,treatment,length\n' + 'A,1,v,1\n'.repeat(12_000)
    const path = join(folder, 'late-latin1.csv')
    writeFileSync(path, Buffer.concat([Buffer.from(head), iconv.encode('Bä,2,v,2\n', 'windows-1252')]))
    const columns = await readColumnsFromFile(path, selection)
    expect(columns.levels[0].labels).toEqual(['A', 'Bä'])
  })

  it('says a workbook is not a text table', async () => {
    const path = join(folder, 'book.xlsx')
    writeFileSync(path, Buffer.from('PK\u0003\u0004rest'))
    await expect(readColumnsFromFile(path, selection)).rejects.toThrow(/is an Excel workbook/)
  })

  it('reports an unreadable path and the first bad value of a long file', async () => {
    await expect(readColumnsFromFile(join(folder, 'absent.csv'), selection)).rejects.toThrow(
      /Cannot read ".*absent.csv": no such file/,
    )
    await expect(readColumnsFromFile(folder, selection)).rejects.toThrow(/is a folder/)
    const lines = ['lab,animal,treatment,length']
    for (let i = 0; i < 30000; i++) lines.push(`A,${i % 5},v,${i === 25000 ? 'x1' : i}`)
    const path = join(folder, 'bad.csv')
    writeFileSync(path, lines.join('\n'))
    await expect(readColumnsFromFile(path, selection)).rejects.toThrow('Row 25001 (line 25002)')
  })
})

describe('readColumnsFromText, binary and count responses', () => {
  const yesNo = { response: 'marker', levels: ['lab', 'mouse'], family: 'binomial' as const }
  const table = 'lab,mouse,marker\nA,m1,positive\nA,m1,negative\nA,m2,NA\n,m2,positive\nB,m1,positive\n'

  it('turns a two-valued response into 0/1 and names the value counted as yes', () => {
    const columns = readColumnsFromText(table, yesNo)
    expect(Array.from(columns.response)).toEqual([1, 0, NaN, NaN, 1])
    expect(columns).toMatchObject({
      family: 'binomial',
      outcome: { positive: 'positive', negative: 'negative' },
    })
    const flipped = readColumnsFromText(table, { ...yesNo, positive: 'negative' })
    expect(Array.from(flipped.response)).toEqual([0, 1, NaN, NaN, 0])
  })

  it('reads a 0/1 column with 1 as yes, and "1.0" as the same value', () => {
    const columns = readColumnsFromText('lab,mouse,y\nA,1,0\nA,1,1.0\nB,1,1\n', { ...yesNo, response: 'y' })
    expect(Array.from(columns.response)).toEqual([0, 1, 1])
    expect(columns.outcome).toEqual({ positive: '1.0', negative: '0' })
  })

  it('names the row and line of a third value, and a yes value the column lacks', () => {
    expect(() => readColumnsFromText(table + 'B,m2,unsure\n', yesNo)).toThrow(
      'Row 6 (line 7): the response column "marker" holds "unsure", a third value besides "positive" and "negative"; a --family binomial response holds two values (or 0 and 1).',
    )
    expect(() => readColumnsFromText(table, { ...yesNo, positive: 'yes' })).toThrow(
      '--positive "yes" is not a value of "marker" (it has "positive" and "negative").',
    )
  })

  it('refuses a count that is negative or not whole, naming row and line', () => {
    const counts = { response: 'puncta', levels: ['lab'], family: 'poisson' as const }
    expect(Array.from(readColumnsFromText('lab,puncta\nA,3\nB,0\n', counts).response)).toEqual([3, 0])
    expect(() => readColumnsFromText('lab,puncta\nA,3\nB,-1\n', counts)).toThrow(
      'Row 2 (line 3): the response column "puncta" holds -1; a --family poisson response must be a whole number of at least 0.',
    )
    expect(() => readColumnsFromText('lab,puncta\nA,2.5\n', counts)).toThrow(/Row 1 \(line 2\).*holds 2\.5/)
  })

  it('reads successes out of trials and refuses successes above the trials', () => {
    const aggregated = { response: 'yes', levels: ['lab'], family: 'binomial' as const, trials: 'n' }
    const columns = readColumnsFromText('lab,yes,n\nA,3,10\nB,0,NA\n', aggregated)
    expect(Array.from(columns.response)).toEqual([3, 0])
    expect(Array.from(columns.trials!)).toEqual([10, NaN])
    expect(columns).toMatchObject({ trialsName: 'n', family: 'binomial' })
    expect(columns.outcome).toBeUndefined()
    expect(() => readColumnsFromText('lab,yes,n\nA,3,10\nB,12,10\n', aggregated)).toThrow(
      'Row 2 (line 3): 12 successes in "yes" but only 10 trials in "n"; successes cannot exceed the trials.',
    )
    expect(() => readColumnsFromText('lab,yes,n\nA,0,0\n', aggregated)).toThrow(
      'Row 1 (line 2): the trials column "n" holds 0; trials must be whole numbers of at least 1.',
    )
    expect(() => readColumnsFromText('lab,yes,n\nA,1,ten\n', aggregated)).toThrow(
      'Row 1 (line 2): the trials column "n" holds "ten", which is not a number.',
    )
  })
})
