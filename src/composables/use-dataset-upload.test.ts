// @vitest-environment happy-dom
import { mount } from '@vue/test-utils'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { defineComponent } from 'vue'
import type { UploadProgress } from '../../shared/schemas/datasets'
import type { UploadCallbacks } from '@/api/datasets'
import { ApiError } from '@/api/http'
import { PROGRESS_POLL_MS, useDatasetUpload } from './use-dataset-upload'

function withUpload() {
  let upload!: ReturnType<typeof useDatasetUpload>
  const wrapper = mount(
    defineComponent({
      setup() {
        upload = useDatasetUpload()
        return () => null
      },
    }),
  )
  return { upload, wrapper }
}

/** The server's progress answers, one per poll (the last one repeats). */
function serverReports(...reports: Partial<UploadProgress>[]) {
  const paths: string[] = []
  let k = 0
  vi.stubGlobal('fetch', async (input: RequestInfo | URL) => {
    paths.push(String(input))
    const report = reports[Math.min(k++, reports.length - 1)]
    const body = {
      token: 't',
      phase: 'receiving',
      bytesRead: 0,
      bytesTotal: 0,
      rowsStored: 0,
      message: null,
      ...report,
    }
    return new Response(JSON.stringify({ data: body }), { status: 200 })
  })
  return paths
}

/** A stand-in for uploadDataset: the test decides when it ends and how. */
function scriptedWork() {
  let callbacks!: UploadCallbacks
  let finish!: (value: { id: number }) => void
  let fail!: (error: unknown) => void
  const work = (given: UploadCallbacks) => {
    callbacks = given
    given.signal?.addEventListener('abort', () => fail(new DOMException('cancelled', 'AbortError')))
    return new Promise<{ id: number }>((resolve, reject) => {
      finish = resolve
      fail = reject
    })
  }
  return {
    work,
    callbacks: () => callbacks,
    finish: (v: { id: number }) => finish(v),
    fail: (e: unknown) => fail(e),
  }
}

beforeEach(() => vi.useFakeTimers())
afterEach(() => {
  vi.useRealTimers()
  vi.unstubAllGlobals()
})

describe('useDatasetUpload', () => {
  it('shows the transfer, then the server’s own progress, then done, and stops asking', async () => {
    const paths = serverReports({ phase: 'storing', bytesRead: 600, bytesTotal: 1200, rowsStored: 3000 })
    const { upload } = withUpload()
    const script = scriptedWork()
    const running = upload.run(script.work)

    expect(upload.stage.value).toBe('sending')
    expect(upload.busy.value).toBe(true)
    script.callbacks().onTransfer?.({ loaded: 300, total: 1200 })
    expect(upload.sent.value).toBe(300)
    expect(upload.total.value).toBe(1200)

    script.callbacks().onSent?.()
    expect(upload.stage.value).toBe('processing')
    expect(upload.sent.value).toBe(1200)

    await vi.advanceTimersByTimeAsync(PROGRESS_POLL_MS)
    expect(paths[0]).toBe(`/api/v1/datasets/uploads/${script.callbacks().token}`)
    expect(upload.server.value).toMatchObject({ phase: 'storing', rowsStored: 3000 })

    script.finish({ id: 7 })
    await expect(running).resolves.toEqual({ id: 7 })
    expect(upload.stage.value).toBe('done')
    const asked = paths.length
    await vi.advanceTimersByTimeAsync(PROGRESS_POLL_MS * 5)
    expect(paths).toHaveLength(asked)
  })

  it('moves on to the server stage when the server has the file even if the browser sent no upload events', async () => {
    serverReports({ phase: 'checking', bytesTotal: 5000 })
    const { upload } = withUpload()
    const script = scriptedWork()
    void upload.run(script.work)

    await vi.advanceTimersByTimeAsync(PROGRESS_POLL_MS)
    expect(upload.stage.value).toBe('processing')
    expect(upload.total.value).toBe(5000)
    script.finish({ id: 1 })
  })

  it('keeps the server’s refusal as the error and ends in failed', async () => {
    serverReports({ phase: 'receiving' })
    const { upload } = withUpload()
    const script = scriptedWork()
    const running = upload.run(script.work)
    script.fail(new ApiError({ status: 400, code: 'INVALID_PAYLOAD', message: 'The file is empty.' }))

    await expect(running).resolves.toBeNull()
    expect(upload.stage.value).toBe('failed')
    expect(upload.error.value?.message).toBe('The file is empty.')
    upload.reset()
    expect(upload.stage.value).toBe('idle')
    expect(upload.error.value).toBeNull()
  })

  it('cancels the transfer on request, and when the page goes away', async () => {
    serverReports({ phase: 'receiving' })
    const { upload, wrapper } = withUpload()
    const first = scriptedWork()
    const running = upload.run(first.work)
    upload.cancel()
    await expect(running).resolves.toBeNull()
    expect(upload.stage.value).toBe('cancelled')
    expect(upload.error.value).toBeNull()

    const second = scriptedWork()
    const again = upload.run(second.work)
    wrapper.unmount()
    await expect(again).resolves.toBeNull()
    expect(upload.stage.value).toBe('cancelled')
  })

  it('refuses a second upload while one runs', async () => {
    serverReports({ phase: 'receiving' })
    const { upload } = withUpload()
    const first = scriptedWork()
    void upload.run(first.work)
    const second = scriptedWork()
    await expect(upload.run(second.work)).resolves.toBeNull()
    expect(second.callbacks()).toBeUndefined()
    first.finish({ id: 1 })
  })
})
