// @vitest-environment happy-dom
import { describe, expect, it } from 'vitest'
import { nextTick, ref } from 'vue'
import { messagesByField, type ServerProblem, useFieldErrors } from '@/composables/field-errors'
import { WorkshopSettingsSchema } from '@shared/schemas/workshop'

const issue422: ServerProblem = {
  status: 422,
  code: 'validation_failed',
  message: 'Some of the details are not right.',
  issues: [{ path: ['body', 'postcode'], message: 'Use at most 20 characters' }],
}

describe('messagesByField', () => {
  it('drops the request part of the path and names the line of a list', () => {
    expect(
      messagesByField([
        { path: ['body', 'email'], message: 'Enter a valid e-mail address' },
        { path: ['addressLines', 1], message: 'Too long' },
      ]),
    ).toEqual({ email: ['Enter a valid e-mail address'], addressLines: ['Line 2: Too long'] })
  })

  it("rewrites zod's developer wording for lengths", () => {
    const result = WorkshopSettingsSchema.safeParse({
      name: 'N',
      addressLines: [],
      postcode: 'X'.repeat(21),
      currency: 'GBP',
      timezone: 'Europe/London',
    })
    expect(result.success).toBe(false)
    expect(messagesByField(result.error!.issues)).toEqual({ postcode: ['Use at most 20 characters'] })
  })
})

describe('useFieldErrors', () => {
  it("shows the server's message on its field until that field is edited", async () => {
    const problem = ref<ServerProblem | null>(null)
    const errors = useFieldErrors(['postcode', 'phone'], problem)

    problem.value = issue422
    await nextTick()
    expect(errors.errorsFor('postcode')).toEqual(['Use at most 20 characters'])
    expect(errors.formMessage.value).toBeNull()

    errors.edit('postcode')
    expect(errors.errorsFor('postcode')).toEqual([])
  })

  it('shows a problem that belongs to no field of the form as a message for the whole form', () => {
    const problem = ref<ServerProblem | null>({ status: 429, code: 'too_many_requests', message: 'Too many attempts.', issues: [] })
    const errors = useFieldErrors(['email'], problem)

    expect(errors.errorsFor('email')).toEqual([])
    expect(errors.formMessage.value).toBe('Too many attempts.')
  })

  it('puts a conflict on the field it concerns', () => {
    const problem = ref<ServerProblem | null>({ status: 409, code: 'email_taken', message: 'Already in use.', issues: [] })
    const errors = useFieldErrors(['email'], problem, { codeFields: { email_taken: 'email' } })

    expect(errors.errorsFor('email')).toEqual(['Already in use.'])
    expect(errors.formMessage.value).toBeNull()
  })

  it('returns the parsed value when the schema accepts it, and messages when it does not', () => {
    const errors = useFieldErrors(['name'], ref(null))

    expect(errors.validate(WorkshopSettingsSchema, { name: '', addressLines: [], currency: 'GBP', timezone: 'Europe/London' })).toBeNull()
    expect(errors.errorsFor('name')).toEqual(['Enter the workshop name'])

    const valid = errors.validate(WorkshopSettingsSchema, {
      name: ' Yard ',
      addressLines: [],
      phone: '',
      currency: 'GBP',
      timezone: 'Europe/London',
    })
    expect(valid).toMatchObject({ name: 'Yard', phone: null })
    expect(errors.errorsFor('name')).toEqual([])
  })
})
