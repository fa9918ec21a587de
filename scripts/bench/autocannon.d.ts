// The small part of autocannon's API the bench uses (it ships no types of its own).
declare module 'autocannon' {
  interface Request {
    method: string
    path: string
    headers?: Record<string, string>
  }
  interface Options {
    url: string
    connections: number
    duration: number
    requests?: Request[]
  }
  interface Result {
    non2xx: number
    errors: number
    requests: { average: number }
  }
  interface Instance extends PromiseLike<Result> {
    on(event: 'response', fn: (client: unknown, status: number, bytes: number, ms: number) => void): void
  }
  function autocannon(opts: Options): Instance
  export default autocannon
}
