import type { Board, BoardQuery, BoardReviewStatus, BoardRow } from '../../shared/schemas/board'
import { NotFoundError } from '../errors/app-error'
import { listAnalyses } from '../repositories/analyses.repo'
import { latestVersionFacts } from '../repositories/board.repo'
import { findLabById } from '../repositories/labs.repo'
import { latestRequestStatusOfVersions, listSignOffsOfAnalyses } from '../repositories/reviews.repo'

/**
 * The lab board: every analysis of a lab with its newest version's headline numbers and review
 * state, for the next lab meeting. Members of the lab read it (the route checks membership).
 */
export async function getLabBoard(labId: number, query: BoardQuery): Promise<Board> {
  if (!(await findLabById(labId))) throw new NotFoundError('Lab not found.')
  const analyses = await listAnalyses({ labIds: [labId] })
  const ids = analyses.map((a) => a.id)
  const [facts, signOffs] = await Promise.all([latestVersionFacts(ids), listSignOffsOfAnalyses(ids)])
  const versionIds = [...facts.values()].map((f) => f.versionId)
  const requestStatus = await latestRequestStatusOfVersions(versionIds)

  const rows: BoardRow[] = analyses.map((a) => {
    const latest = facts.get(a.id)!
    const own = signOffs.filter((s) => s.analysisVersionId === latest.versionId)
    const earlier = signOffs.filter((s) => s.analysisId === a.id && s.versionNo < a.latestVersion.versionNo)
    const request = requestStatus.get(latest.versionId)
    // Hashes are verified on the result page; the board shows the recorded state.
    let reviewStatus: BoardReviewStatus = 'not_requested'
    if (own.length) reviewStatus = 'signed_off'
    else if (request === 'open') reviewStatus = 'in_review'
    else if (request === 'changes_requested') reviewStatus = 'changes_requested'
    else if (earlier.length) reviewStatus = 'not_covered'
    const headline = a.latestVersion.headline
    return {
      analysisId: a.id,
      name: a.name,
      project: a.project,
      dataset: a.dataset,
      author: a.createdBy,
      versionNo: a.latestVersion.versionNo,
      runStatus: a.latestVersion.status,
      date: a.latestVersion.finishedAt ?? latest.createdAt.toISOString(),
      effectiveN: headline?.effectiveN ?? null,
      designEffect: headline?.designEffect ?? null,
      unitsPerCondition: latest.unitsPerCondition,
      minUnitsPerCondition: headline?.minUnitsPerCondition ?? null,
      warningCount: headline?.warningCount ?? 0,
      reviewStatus,
    }
  })

  const projects = new Map(rows.map((r) => [r.project.id, r.project]))
  const authors = new Map(rows.map((r) => [r.author.id, r.author]))
  const filtered = rows.filter(
    (r) =>
      (query.projectId === undefined || r.project.id === query.projectId) &&
      (query.reviewStatus === undefined || r.reviewStatus === query.reviewStatus) &&
      (query.authorId === undefined || r.author.id === query.authorId) &&
      (query.from === undefined || new Date(r.date) >= query.from) &&
      (query.to === undefined || new Date(r.date) <= query.to),
  )
  return {
    rows: filtered,
    projects: [...projects.values()].sort((a, b) => a.name.localeCompare(b.name)),
    authors: [...authors.values()].sort((a, b) => a.name.localeCompare(b.name)),
  }
}
