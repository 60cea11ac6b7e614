import ExcelJS from 'exceljs'
import { describe, expect, it } from 'vitest'
import { readWorkbookSheetNames, sheetNamesFromWorkbookXml } from './workbook-sheets'

async function workbookBlob(sheets: string[]): Promise<Blob> {
  const workbook = new ExcelJS.Workbook()
  for (const name of sheets) workbook.addWorksheet(name).addRow(['lab', 'mouse', 'neurite_length_um'])
  const buffer = await workbook.xlsx.writeBuffer()
  return new Blob([buffer as ArrayBuffer])
}

describe('readWorkbookSheetNames', () => {
  it('reads the sheet names of a real .xlsx in workbook order', async () => {
    const names = await readWorkbookSheetNames(await workbookBlob(['Cells', 'Notes & <refs>', 'Plate "B"']))
    expect(names).toEqual(['Cells', 'Notes & <refs>', 'Plate "B"'])
  })

  it('answers null for a file that is not a workbook', async () => {
    expect(await readWorkbookSheetNames(new Blob(['lab,mouse\nnimbus,m1\n']))).toBeNull()
    expect(await readWorkbookSheetNames(new Blob([]))).toBeNull()
  })
})

describe('sheetNamesFromWorkbookXml', () => {
  it('decodes XML escapes and accepts prefixed elements', () => {
    const xml =
      '<x:workbook><x:sheets><x:sheet name="Day 1 &amp; 2" sheetId="1"/>' +
      "<x:sheet sheetId='2' name='&#956;m &#x3bc;m'/></x:sheets></x:workbook>"
    expect(sheetNamesFromWorkbookXml(xml)).toEqual(['Day 1 & 2', 'μm μm'])
  })
})
