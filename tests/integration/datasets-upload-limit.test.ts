import { afterAll, describe, expect, it } from 'vitest'

// The limit is read from the environment when the configuration loads, so set it before importing the app.
process.env.UPLOAD_MAX_MB = '0.01'
const { closeConnections, createTestApp } = await import('../support/api')
const { db } = await import('../../server/db')
const { signedInTeam, uploadDataset } = await import('./datasets-support')
// The configuration is parsed now; leave the environment as other test files expect it.
delete process.env.UPLOAD_MAX_MB

afterAll(() => closeConnections())

describe('upload size limit', () => {
  it('answers 413 with the limit in plain words and stores nothing', async () => {
    const app = createTestApp()
    const team = await signedInTeam(app)
    const big = Buffer.from('lab,length\n' + 'Nimbus,123.456\n'.repeat(2000))
    const res = await uploadDataset(app, team.cookies.scientist, big, 'big.csv', {
      labId: team.lab.id,
      token: 'too-big-upload',
    })
    expect(res.status).toBe(413)
    expect(res.body.error).toMatchObject({ code: 'PAYLOAD_TOO_LARGE', details: { limitMb: 0.01 } })
    expect(res.body.error.message).toBe(
      'The file is larger than the upload limit of 0.01 MB. Split it, or ask the administrator to raise UPLOAD_MAX_MB.',
    )
    expect(await db('datasets').where({ lab_id: team.lab.id }).first()).toBeUndefined()
    const small = await uploadDataset(
      app,
      team.cookies.scientist,
      Buffer.from('lab,length\nNimbus,1\nFernhill,2\n'),
      'small.csv',
      { labId: team.lab.id },
    )
    expect(small.status).toBe(201)
  })
})
