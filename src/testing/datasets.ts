import type {
  ColumnProfile,
  DatasetDetail,
  DatasetSummary,
  DatasetVersionDetail,
  DatasetVersionSummary,
  DesignSummary,
  Exclusion,
  NestingSuggestion,
  Project,
  RowsPage,
  Tagging,
} from '../../shared/schemas/datasets'

// Invented three-lab neurite data (lab › mouse, mouse labels reused in every lab), shaped like the API's answers.

const sami = { id: 3, name: 'Sami Reed' }
const when = '2026-12-02T09:14:00.000Z'

export function project(overrides: Partial<Project> = {}): Project {
  return {
    id: 1,
    labId: 1,
    name: 'Neurite pilot',
    description: '',
    datasetCount: 0,
    createdAt: when,
    updatedAt: when,
    ...overrides,
  }
}

export function versionSummary(overrides: Partial<DatasetVersionSummary> = {}): DatasetVersionSummary {
  return {
    id: 1,
    datasetId: 1,
    versionNo: 1,
    originalFilename: 'neurites-three-labs.csv',
    byteSize: 1911,
    sha256: 'b456c87a9b923c70a1ab0cee1ca741e98eb1a8fbaff6b2717c73448d35037728',
    fileType: 'csv',
    encoding: 'utf-8',
    delimiter: ',',
    decimalMark: '.',
    sheetName: null,
    sheetNames: [],
    headerRow: 1,
    rowCount: 72,
    columnCount: 5,
    excludedRowCount: 0,
    status: 'ready',
    naValues: ['', 'NA'],
    createdBy: sami,
    createdAt: when,
    ingestMs: 116,
    tagged: true,
    ...overrides,
  }
}

export function dataset(overrides: Partial<DatasetSummary> = {}): DatasetSummary {
  return {
    id: 1,
    labId: 1,
    labName: 'Nimbus Neurite Lab',
    project: { id: 1, name: 'Neurite pilot' },
    name: 'Three-lab neurites',
    description: '',
    createdBy: sami,
    createdAt: when,
    updatedAt: when,
    deletedAt: null,
    latestVersion: versionSummary(),
    versionCount: 1,
    ...overrides,
  }
}

export function datasetDetail(overrides: Partial<DatasetDetail> = {}): DatasetDetail {
  const base = dataset()
  return {
    ...base,
    versions: [base.latestVersion!],
    permissions: { upload: true, edit: true, delete: true },
    ...overrides,
  }
}

function column(position: number, name: string, overrides: Partial<ColumnProfile>): ColumnProfile {
  return {
    position,
    name,
    type: 'text',
    missingCount: 0,
    distinctCount: 0,
    distinctCapped: false,
    min: null,
    max: null,
    mean: null,
    sd: null,
    sampleValues: [],
    topValues: null,
    ...overrides,
  }
}

export const neuriteColumns: ColumnProfile[] = [
  column(1, 'lab', {
    distinctCount: 3,
    sampleValues: ['nimbus', 'fernhill', 'larkspur'],
    topValues: [
      { value: 'nimbus', count: 24 },
      { value: 'fernhill', count: 25 },
      { value: 'larkspur', count: 23 },
    ],
  }),
  column(2, 'mouse', {
    distinctCount: 4,
    sampleValues: ['m1', 'm2', 'm3', 'm4'],
    topValues: ['m1', 'm2', 'm3', 'm4'].map((value) => ({ value, count: 18 })),
  }),
  column(3, 'condition', {
    distinctCount: 2,
    sampleValues: ['vehicle', 'NW-117'],
    topValues: [
      { value: 'vehicle', count: 34 },
      { value: 'NW-117', count: 38 },
    ],
  }),
  column(4, 'neuron', { type: 'integer', distinctCount: 7, min: 1, max: 7, mean: 3.556, sd: 1.9 }),
  column(5, 'neurite_length_um', {
    type: 'numeric',
    distinctCount: 65,
    missingCount: 2,
    min: 63.6,
    max: 105.5,
    mean: 83.19,
    sd: 9.1,
  }),
]

export const neuriteSuggestion: NestingSuggestion = {
  levels: [
    { column: 'lab', unitCount: 3, perParent: null, reusedLabels: [] },
    {
      column: 'mouse',
      unitCount: 12,
      perParent: { min: 4, median: 4, max: 4 },
      reusedLabels: ['m1', 'm2', 'm3', 'm4'],
    },
  ],
  conditionColumn: 'condition',
  conditionLevel: 'mouse',
  conditionPlacement: 'between-units',
  responseColumns: ['neurite_length_um'],
  aliases: [],
  explanation: [
    'Suggested nesting, outermost first: “lab” › “mouse”.',
    '“mouse” has 12 units, 4 in each “lab”.',
  ],
  observationCount: 72,
}

export function tagging(overrides: Partial<Tagging> = {}): Tagging {
  return {
    id: 5,
    versionId: 1,
    responseColumns: ['neurite_length_um'],
    conditionColumn: 'condition',
    levels: ['lab', 'mouse'],
    createdBy: sami,
    createdAt: when,
    carriedOver: false,
    ...overrides,
  }
}

export const neuriteDesign: DesignSummary = {
  observationCount: 72,
  levels: [
    { column: 'lab', unitCount: 3, perParent: null, reusedLabels: [] },
    { column: 'mouse', unitCount: 12, perParent: { min: 4, median: 4, max: 4 }, reusedLabels: ['m1', 'm2'] },
  ],
  conditionLevel: 'mouse',
  conditionPlacement: 'between-units',
  arms: [
    { value: 'vehicle', unitCount: 6, observationCount: 34 },
    { value: 'NW-117', unitCount: 2, observationCount: 38 },
  ],
  explanation: ['“lab” has 3 units.'],
  missingValues: [],
}

export function exclusion(overrides: Partial<Exclusion> = {}): Exclusion {
  return {
    id: 9,
    versionId: 1,
    kind: 'rule',
    rule: { column: 'neurite_length_um', operator: 'gt', value: 100 },
    unit: null,
    reason: 'Traced across two crossing neurites',
    matchedRows: 4,
    createdBy: sami,
    createdAt: when,
    removedAt: null,
    removedBy: null,
    ...overrides,
  }
}

export function versionDetail(overrides: Partial<DatasetVersionDetail> = {}): DatasetVersionDetail {
  return {
    ...versionSummary(),
    columns: neuriteColumns,
    suggestion: neuriteSuggestion,
    tagging: null,
    exclusions: [],
    ...overrides,
  }
}

export function rowsPage(overrides: Partial<RowsPage> = {}): RowsPage {
  return {
    columns: neuriteColumns.map((c) => c.name),
    rows: [
      { rowNumber: 2, values: ['nimbus', 'm1', 'vehicle', '1', '105.5'], excludedBy: [9] },
      { rowNumber: 3, values: ['nimbus', 'm1', 'vehicle', '2', null], excludedBy: [] },
    ],
    total: 72,
    page: 1,
    pageSize: 25,
    ...overrides,
  }
}
