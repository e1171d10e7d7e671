// @vitest-environment happy-dom
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import { beforeEach, describe, expect, it, vi } from 'vitest'
import { computed, defineComponent, h } from 'vue'
import { uploadPhotos } from '@/api/findings'
import { ApiError } from '@/api/http'
import FindingPhotoUploader from '@/components/findings/FindingPhotoUploader.vue'
import { useFindingsStore } from '@/stores/findings'
import { useNotificationsStore } from '@/stores/notifications'
import { buttonNamed, controlLabelled } from '../support/queries'
import { createTestVuetify } from '../support/vuetify'

vi.mock('@/api/findings', () => ({ uploadPhotos: vi.fn(), listFindings: vi.fn() }))

const FINDING = '44444444-4444-4444-8444-444444444444'
const notAPhoto = 'That file is not a photo we can use. Send a JPEG, PNG or WebP picture.'

/** Wires the uploader to the findings store the way the inspection and findings pages do. */
const Harness = defineComponent(() => {
  const findings = useFindingsStore()
  const here = computed(() => (findings.upload?.findingId === FINDING ? findings.upload : null))
  return () =>
    h(FindingPhotoUploader, {
      uploading: here.value?.isUploading ?? false,
      progress: here.value?.progress ?? 0,
      problem: here.value?.error ?? null,
      canRetry: here.value?.retryable ?? false,
      onUpload: (files: File[]) => findings.uploadPhotos(FINDING, files),
      onRetry: () => here.value && findings.uploadPhotos(FINDING, here.value.files),
    })
})

function mountHarness() {
  const pinia = createPinia()
  setActivePinia(pinia)
  return mount(Harness, { global: { plugins: [createTestVuetify(), pinia] } })
}

async function choose(wrapper: ReturnType<typeof mountHarness>, label: string, files: File[]) {
  const input = controlLabelled(wrapper, label)
  Object.defineProperty(input.element, 'files', { value: files, configurable: true })
  await input.trigger('change')
  await flushPromises()
}

const file = (name: string, size = 10) => new File([new Uint8Array(size)], name, { type: 'image/jpeg' })

beforeEach(() => {
  vi.mocked(uploadPhotos).mockReset()
})

describe('FindingPhotoUploader', () => {
  it('offers the rear camera and a choice of several photos', () => {
    const wrapper = mountHarness()

    const camera = controlLabelled(wrapper, 'Take a photo')
    expect(camera.attributes()).toMatchObject({ type: 'file', accept: 'image/*', capture: 'environment' })
    expect(camera.attributes('multiple')).toBeUndefined()
    expect(controlLabelled(wrapper, 'Choose photos').attributes('multiple')).toBeDefined()
  })

  it('shows the server’s message when it refuses a file that is not a photo (415)', async () => {
    vi.mocked(uploadPhotos).mockRejectedValue(new ApiError(415, 'unsupported_image', notAPhoto))
    const wrapper = mountHarness()
    const files = [file('brake.jpg'), file('notes.pdf')]

    await choose(wrapper, 'Choose photos', files)

    expect(uploadPhotos).toHaveBeenCalledWith(FINDING, files, expect.objectContaining({ onProgress: expect.any(Function) }))
    const alert = wrapper.get('[role="alert"]')
    expect(alert.text()).toContain('The photos were not added')
    expect(alert.text()).toContain(notAPhoto)
    // The same file would be refused again, so sending it again is not offered.
    expect(() => buttonNamed(wrapper, 'Send them again')).toThrow()
    // Shown in place, next to the buttons, not a second time as a notification.
    expect(useNotificationsStore().queue).toEqual([])
  })

  it('sends the same photos again after the connection failed', async () => {
    vi.mocked(uploadPhotos)
      .mockRejectedValueOnce(new ApiError(0, 'network_error', 'The photos could not be sent: the server cannot be reached.'))
      .mockResolvedValue([])
    const wrapper = mountHarness()
    const files = [file('uj.jpg')]

    await choose(wrapper, 'Choose photos', files)
    expect(wrapper.get('[role="alert"]').text()).toContain('the server cannot be reached')
    await buttonNamed(wrapper, 'Send them again').trigger('click')
    await flushPromises()

    expect(vi.mocked(uploadPhotos).mock.calls[1]?.[1]).toEqual(files)
    expect(wrapper.find('[role="alert"]').exists()).toBe(false)
  })

  it('shows progress while sending', async () => {
    let report: ((fraction: number) => void) | undefined
    vi.mocked(uploadPhotos).mockImplementation((_id, _files, options) => {
      report = options?.onProgress
      return new Promise(() => undefined)
    })
    const wrapper = mountHarness()

    await choose(wrapper, 'Take a photo', [file('uj.jpg')])
    report?.(0.4)
    await flushPromises()

    expect(wrapper.get('[role="status"]').text()).toBe('Sending the photo… 40%')
    expect(wrapper.get('[role="progressbar"]').attributes('aria-valuenow')).toBe('40')
    expect(buttonNamed(wrapper, 'Take a photo').attributes('disabled')).toBeDefined()
  })

  it('refuses more than 10 photos, or one over 15 MB, before sending anything', async () => {
    const wrapper = mountHarness()

    await choose(
      wrapper,
      'Choose photos',
      Array.from({ length: 11 }, (_, i) => file(`p${i}.jpg`)),
    )
    expect(wrapper.get('[role="alert"]').text()).toContain('Choose at most 10 photos at a time; you chose 11.')

    await choose(wrapper, 'Choose photos', [file('small.jpg'), file('huge.jpg', 15 * 1024 * 1024 + 1)])
    expect(wrapper.get('[role="alert"]').text()).toContain('huge.jpg is over 15 MB')
    expect(uploadPhotos).not.toHaveBeenCalled()
  })
})
