import { vi } from 'vitest'
import { mount, type ComponentMountingOptions } from '@vue/test-utils'
import type { Component } from 'vue'
import { createPinia } from 'pinia'
import PrimeVue from 'primevue/config'
import { QueryClient, VueQueryPlugin } from '@tanstack/vue-query'

// jsdom has no matchMedia; PrimeVue's Select asks it for the screen's orientation. A screen that
// matches no media query is what a desktop browser without special settings reports.
if (typeof window !== 'undefined' && !window.matchMedia) {
  window.matchMedia = (query: string) =>
    ({
      matches: false,
      media: query,
      onchange: null,
      addEventListener() {},
      removeEventListener() {},
      addListener() {},
      removeListener() {},
      dispatchEvent: () => false,
    }) as MediaQueryList
}

// Nor ResizeObserver; PrimeVue's auto-resizing Textarea asks for one. Nothing is ever resized in jsdom.
if (typeof window !== 'undefined' && !window.ResizeObserver) {
  window.ResizeObserver = class {
    observe(): void {}
    unobserve(): void {}
    disconnect(): void {}
  }
}

/**
 * Mounts a component as the app runs it: real PrimeVue (unstyled: jsdom draws nothing), a fresh
 * Pinia and a fresh query cache. Only the HTTP answer is faked, at fetch (answerFetch below).
 */
export function mountInApp<C extends Component>(component: C, options: ComponentMountingOptions<C> = {}) {
  const queryClient = new QueryClient({ defaultOptions: { queries: { retry: false }, mutations: { retry: false } } })
  return mount(component, {
    ...options,
    global: {
      ...options.global,
      plugins: [createPinia(), [PrimeVue, { unstyled: true }], [VueQueryPlugin, { queryClient }], ...(options.global?.plugins ?? [])],
    },
  } as ComponentMountingOptions<C>)
}

export interface FakeAnswer {
  status: number
  body: unknown
}
export interface SeenRequest {
  method: string
  path: string
  body: unknown
}

/**
 * Answers the client's fetch calls by "METHOD /path" (without /api). The CSRF token the client
 * asks for before a write is answered too; any other request fails the test with its name.
 */
export function answerFetch(answers: Record<string, FakeAnswer | ((body: unknown) => FakeAnswer)>): SeenRequest[] {
  const seen: SeenRequest[] = []
  vi.stubGlobal(
    'fetch',
    vi.fn(async (input: string, init: RequestInit = {}) => {
      const method = init.method ?? 'GET'
      const path = String(input).replace(/^\/api/, '')
      const body = typeof init.body === 'string' ? (JSON.parse(init.body) as unknown) : undefined
      const key = `${method} ${path}`
      const answer = key === 'GET /auth/csrf' ? { status: 200, body: { csrfToken: 'component-test' } } : answers[key]
      if (!answer) throw new Error(`unexpected request ${key}`)
      if (key !== 'GET /auth/csrf') seen.push({ method, path, body })
      const { status, body: out } = typeof answer === 'function' ? answer(body) : answer
      return new Response(JSON.stringify(out), { status, headers: { 'Content-Type': 'application/json' } })
    }),
  )
  return seen
}
