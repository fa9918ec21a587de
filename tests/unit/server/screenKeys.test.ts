import { describe, expect, it } from 'vitest'
import { screenKeys } from '../../../server/middleware/validate'
import { Invalid } from '../../../server/errors'

const refusal = (value: unknown) => {
  try {
    screenKeys(value)
    return null
  } catch (err) {
    return err instanceof Invalid ? { message: err.message, fields: err.fields } : err
  }
}

describe('input keys that shadow Object.prototype members', () => {
  it.each(['toString', 'valueOf', 'hasOwnProperty', 'constructor', '__proto__', 'isPrototypeOf', '__defineGetter__'])(
    'when a body has the key %s, then it is refused naming the key',
    (key) => {
      const body = JSON.parse(`{"${key}": 1}`)
      expect(refusal(body)).toEqual({ message: `The field "${key}" is not accepted`, fields: { [key]: 'This field name is not accepted' } })
    },
  )

  it('when the key is nested in a list, then the refusal names its path', () => {
    expect(refusal({ rows: [{ ok: 1 }, { valueOf: 2 }] })).toMatchObject({
      fields: { 'rows.1.valueOf': 'This field name is not accepted' },
    })
  })

  it('when values merely contain such words, then they pass', () => {
    expect(refusal({ title: 'constructor', notes: '__proto__', tags: ['toString'] })).toBeNull()
  })

  it('when the input is nested more than 32 levels, then it is refused', () => {
    let deep: unknown = 1
    for (let i = 0; i < 40; i += 1) deep = { a: deep }
    expect(refusal(deep)).toMatchObject({ message: 'The input is nested more than 32 levels deep' })
  })
})
