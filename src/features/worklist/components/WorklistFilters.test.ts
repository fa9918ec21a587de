// @vitest-environment jsdom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { defineComponent, h } from 'vue'
import { createMemoryHistory, createRouter, type Router } from 'vue-router'
import { flushPromises } from '@vue/test-utils'
import { answerFetch, mountInApp } from '@/testing/component'
import { useWorklistUrl } from '../composables/useWorklistUrl'
import WorklistFilters from './WorklistFilters.vue'

afterEach(() => vi.unstubAllGlobals())

// The filter bar wired to the address as WorklistView wires it.
const Host = defineComponent({
  setup() {
    const url = useWorklistUrl()
    return () => h(WorklistFilters, { filters: url.filters.value, onChange: (c: object) => url.update(c), onClear: url.clear })
  },
})

async function mountAt(path: string): Promise<{ router: Router; wrapper: ReturnType<typeof mountInApp> }> {
  answerFetch({ 'GET /staff?role=surgeon': { status: 200, body: { rows: [] } }, 'GET /procedures': { status: 200, body: { rows: [] } } })
  const router = createRouter({ history: createMemoryHistory(), routes: [{ path: '/worklist', name: 'worklist', component: Host }] })
  await router.push(path)
  const wrapper = mountInApp(Host, { global: { plugins: [router] }, attachTo: document.body })
  await flushPromises()
  return { router, wrapper }
}

describe('the worklist filters', () => {
  it('when a link names a search, then the search box shows it and the filters can be cleared', async () => {
    const { wrapper } = await mountAt('/worklist?q=Demo&stage=clinic')
    expect((wrapper.get('#wl-q').element as HTMLInputElement).value).toBe('Demo')
    const clear = wrapper.findAll('button').find((b) => b.text().includes('Clear filters'))!
    expect(clear.attributes('disabled')).toBeUndefined()
    wrapper.unmount()
  })

  it('when a link holds nothing the worklist knows, then nothing is kept and there is nothing to clear', async () => {
    const { wrapper } = await mountAt('/worklist?stage=not-a-stage&surgeonId=-4&from=yesterday')
    const clear = wrapper.findAll('button').find((b) => b.text().includes('Clear filters'))!
    expect(clear.attributes('disabled')).toBeDefined()
    wrapper.unmount()
  })

  it('when a search is typed, then after the pause it is in the address, and the page starts again from the first', async () => {
    const { router, wrapper } = await mountAt('/worklist?page=3&stage=clinic')
    await wrapper.get('#wl-q').setValue('  Demo  ')
    await vi.waitFor(() => expect(router.currentRoute.value.query).toEqual({ stage: 'clinic', q: 'Demo' }))
    wrapper.unmount()
  })

  it('when Clear filters is pressed, then the address holds no filter and the search box empties', async () => {
    const { router, wrapper } = await mountAt('/worklist?q=Demo&stage=clinic&priority=urgent')
    await wrapper
      .findAll('button')
      .find((b) => b.text().includes('Clear filters'))!
      .trigger('click')
    await flushPromises()
    expect(router.currentRoute.value.query).toEqual({})
    expect((wrapper.get('#wl-q').element as HTMLInputElement).value).toBe('')
    wrapper.unmount()
  })
})
