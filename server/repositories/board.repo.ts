import { defaultConn, type Conn } from './connection'

export interface LatestVersionFacts {
  analysisId: number
  versionId: number
  createdAt: Date
  unitsPerCondition: { condition: string; nUnits: number | null }[]
}

/**
 * For each analysis, its newest version's id and the units per condition read out of the stored
 * result in SQL (the board never loads whole results).
 */
export async function latestVersionFacts(
  analysisIds: number[],
  conn: Conn = defaultConn,
): Promise<Map<number, LatestVersionFacts>> {
  if (!analysisIds.length) return new Map()
  const rows: {
    analysis_id: number
    id: number
    created_at: Date
    units: { condition: string; nUnits: number | null }[] | null
  }[] = await conn('analysis_versions as v')
    .distinctOn('v.analysis_id')
    .whereIn('v.analysis_id', analysisIds)
    .orderBy([{ column: 'v.analysis_id' }, { column: 'v.version_no', order: 'desc' }])
    .select(
      'v.analysis_id',
      'v.id',
      'v.created_at',
      conn.raw(
        `(select jsonb_agg(jsonb_build_object('condition', g->>'condition', 'nUnits', (g->>'nUnits')::int))
            from jsonb_array_elements(v.result->'groups') g) as units`,
      ),
    )
  return new Map(
    rows.map((r) => [
      Number(r.analysis_id),
      {
        analysisId: Number(r.analysis_id),
        versionId: Number(r.id),
        createdAt: r.created_at,
        unitsPerCondition: r.units ?? [],
      },
    ]),
  )
}
