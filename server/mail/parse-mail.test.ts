import nodemailer, { type SendMailOptions } from 'nodemailer'
import { describe, expect, it } from 'vitest'
import { decodeHeaderValue, parseMail } from './parse-mail'

// Messages are composed by nodemailer itself (its stream transport), the same code that sends ours.
async function compose(message: SendMailOptions): Promise<{ raw: Buffer; messageId: string }> {
  const transport = nodemailer.createTransport({ streamTransport: true, buffer: true, newline: 'windows' })
  const info = await transport.sendMail({ from: 'Nestwise <no-reply@nestwise.invalid>', ...message })
  return { raw: info.message as Buffer, messageId: info.messageId }
}

describe('parseMail', () => {
  it('reads a plain-text message with a long link and non-ASCII text intact', async () => {
    const link = `http://127.0.0.1:3000/join#${'Ab3_-'.repeat(9)}xyz`
    const text = `Grüße aus dem Labor — Zellkultur µm\n\nOpen this link:\n${link}\n`
    const { raw, messageId } = await compose({
      to: 'nell@example.test',
      subject: 'Einladung: Nimbus Neurite Lab – µm',
      text,
    })
    const parsed = parseMail(raw)
    expect(parsed.subject).toBe('Einladung: Nimbus Neurite Lab – µm')
    expect(parsed.to).toBe('nell@example.test')
    expect(parsed.from).toBe('Nestwise <no-reply@nestwise.invalid>')
    expect(parsed.messageId).toBe(messageId)
    expect(parsed.text?.replace(/\r\n/g, '\n')).toBe(text)
    expect(parsed.html).toBeNull()
  })

  it('reads both alternatives of a text + HTML message', async () => {
    const html = '<p>Welcome to <b>Fernhill Culture Lab</b> &amp; friends</p>'
    const { raw } = await compose({ to: 'a@example.test', subject: 'Hello', text: 'Plain version', html })
    const parsed = parseMail(raw)
    expect(parsed.text).toBe('Plain version')
    expect(parsed.html).toBe(html)
  })

  it('decodes base64 bodies in another charset', () => {
    const body = Buffer.from('Messwert: 12,5 µm', 'latin1').toString('base64')
    const raw = [
      'Subject: plain',
      'Content-Type: text/plain; charset=iso-8859-1',
      'Content-Transfer-Encoding: base64',
      '',
      body,
    ].join('\r\n')
    expect(parseMail(raw).text).toBe('Messwert: 12,5 µm')
  })
})

describe('decodeHeaderValue', () => {
  it('joins adjacent encoded words and leaves plain text alone', () => {
    expect(decodeHeaderValue('=?UTF-8?Q?Gr=C3=BC?= =?UTF-8?B?w59l?= from Nestwise')).toBe(
      'Grüße from Nestwise',
    )
    expect(decodeHeaderValue('Plain subject')).toBe('Plain subject')
  })
})
