/** A fetch stand-in answering by "METHOD path"; unknown requests fail loudly. */
export function fakeFetch(
  answers: Record<string, { status: number; body?: unknown; headers?: Record<string, string> }>,
) {
  const calls: { method: string; path: string; init: RequestInit }[] = []
  const fn = async (input: RequestInfo | URL, init: RequestInit = {}) => {
    const path = String(input)
    const method = init.method ?? 'GET'
    calls.push({ method, path, init })
    const answer = answers[`${method} ${path}`]
    if (!answer) throw new Error(`unexpected request ${method} ${path}`)
    const body = answer.body === undefined ? null : JSON.stringify(answer.body)
    return new Response(body, {
      status: answer.status,
      headers: { 'Content-Type': 'application/json', ...answer.headers },
    })
  }
  return { fetch: fn, calls }
}
