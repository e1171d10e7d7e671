import type { Locator, Page } from 'playwright-core'
import sharp from 'sharp'
import { describe, expect, it } from 'vitest'
import { expectNoSeriousAxe, screenshot, signInAs, useJourneyBrowser, visible } from './support/browser'

const TECHNICIAN = 'tech@brackenfold4x4.test'
/** The demo job that is assigned to the technician and waiting for its inspection (server/db/seed.ts). */
const SEEDED_CONCERN = 'Knock from the front when pulling away, worse on full lock.'

const browser = useJourneyBrowser()

/** A photo as a phone would send it: a JPEG with something to see in it. */
async function workshopPhoto(): Promise<Buffer> {
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="800" height="600">
    <rect width="800" height="600" fill="#4a4f55"/>
    <circle cx="400" cy="300" r="190" fill="#8a8f96" stroke="#2b2e33" stroke-width="24"/>
    <ellipse cx="470" cy="430" rx="90" ry="40" fill="#1d1a12" opacity="0.8"/>
  </svg>`
  return sharp(Buffer.from(svg)).jpeg({ quality: 80 }).toBuffer()
}

/** One check's card on the open panels: the side's section, then the card named by its prompt. */
function checkCard(page: Page, side: 'Left' | 'Right' | 'Front' | 'Rear', prompt: string): Locator {
  const card = page.getByRole('article', { name: prompt, exact: true })
  return page.getByRole('region', { name: side, exact: true }).filter({ has: card }).getByRole('article', { name: prompt, exact: true })
}

async function savedIn(card: Locator): Promise<void> {
  await visible(card.getByRole('status').getByText('Saved', { exact: true }))
}

describe('the technician inspects the drivetrain on a phone', () => {
  it('opens the waiting job, passes the safety step, records checks and a photo', async () => {
    const page = await browser.current.newPhonePage()
    await signInAs(page, TECHNICIAN)

    // From the bottom bar to the job the technician has been given.
    const bar = page.getByRole('navigation', { name: 'Main' })
    await bar.getByRole('link', { name: 'Jobs' }).click()
    await visible(page.getByRole('heading', { name: 'Jobs', level: 1 }))
    await visible(page.getByRole('link', { name: SEEDED_CONCERN }))
    await screenshot(page, 'technician-0-jobs')
    await page.getByRole('link', { name: SEEDED_CONCERN }).click()
    await visible(page.getByRole('heading', { name: 'Inspection and findings' }))
    await screenshot(page, 'technician-1-job', { at: page.getByRole('link', { name: 'Inspect' }) })
    // A job never inspected starts its inspection on opening, with the vehicle group's template.
    await page.getByRole('link', { name: 'Inspect' }).click()
    await visible(page.getByRole('heading', { name: 'Inspection', level: 1 }))

    // Safety first: the cautions, four confirmations, then stands that must carry the axle load.
    await visible(page.getByRole('heading', { name: 'Before you go under the vehicle' }))
    await visible(page.getByText('Never work under a vehicle held up only by a jack.'))
    await screenshot(page, 'technician-2-safety-cautions')
    const go = page.getByRole('button', { name: 'Confirm and start the checks' })
    expect(await go.isDisabled()).toBe(true)
    for (const point of [
      'The stands are on firm, level ground',
      'The stands are at proper lifting or support points',
      'The wheels left on the ground are chocked',
      'Nothing is held up by a jack alone',
    ]) {
      await page.getByLabel(point).check()
    }
    // 2 stands × 1000 kg each = 2000 kg, short of a 2500 kg axle: the checks stay closed.
    await page.getByLabel('Stand rating (kg)').fill('1000')
    await page.getByLabel('Per stand', { exact: true }).check()
    await page.getByLabel('Number of stands under the vehicle').fill('2')
    await page.getByLabel('Axle load (kg)').fill('2500')
    await visible(page.getByText('Stands not rated for the load'))
    expect(await go.isDisabled()).toBe(true)
    await screenshot(page, 'technician-3-safety-not-rated', { at: page.getByText('Stands not rated for the load') })
    await expectNoSeriousAxe(page, 'technician safety step')

    // Heavier stands: 2 × 1500 kg = 3000 kg covers the 2500 kg load.
    await page.getByLabel('Stand rating (kg)').fill('1500')
    await visible(page.getByText('Stands rated for the load'))
    await visible(page.getByText('The stands are rated 3000 kg together, above the 2500 kg axle load.'))
    expect(await go.isEnabled()).toBe(true)
    await go.click()

    // The checks, grouped by area; the first area is open.
    await visible(page.getByRole('heading', { name: 'Swivel housings', level: 2 }))

    const leak = checkCard(page, 'Left', 'Oil at the swivel housing seal')
    await leak.getByRole('button', { name: 'Wet leak' }).click()
    await savedIn(leak)
    expect(await leak.getByRole('button', { name: 'Wet leak' }).getAttribute('aria-pressed')).toBe('true')
    await visible(leak.getByText('Fix soon'))

    const rightLeak = checkCard(page, 'Right', 'Oil at the swivel housing seal')
    await rightLeak.getByRole('button', { name: 'Dry' }).click()
    await savedIn(rightLeak)
    await visible(rightLeak.getByText('All good'))

    const play = checkCard(page, 'Left', 'Swivel bearing play (rock the wheel top to bottom)')
    await play.getByRole('button', { name: 'Pass', exact: true }).click()
    await savedIn(play)

    // Differential operation test, front axle: the guided questions one at a time, then the verdict.
    await page.getByRole('button', { name: /Axle differentials/ }).click()
    const diff = checkCard(page, 'Front', 'Differential operation test')
    await visible(diff.getByText('Step 1 of 5'))
    const answers: [string, 'Yes' | 'No'][] = [
      ['Turn the prop shaft by hand. Do both wheels turn the same way?', 'Yes'],
      ['While you turn the prop, do both wheels keep turning at exactly the same speed', 'No'],
      ['Hold the prop shaft still and turn one wheel. Does the other wheel turn the opposite way?', 'Yes'],
      ['Hold one wheel still and turn the other. Does the prop shaft turn?', 'Yes'],
      ['Was either wheel stiff or hard to turn at any point?', 'No'],
    ]
    for (const [question, answer] of answers) {
      const group = diff.getByRole('group', { name: new RegExp(`^${question.replace(/[.?]/g, '\\$&')}`) })
      await group.getByRole('button', { name: answer, exact: true }).click()
    }
    await visible(diff.getByText('Verdict: normal.'))
    await visible(diff.getByText('The differential works as it should'))
    await savedIn(diff)
    await screenshot(page, 'technician-5-diff-verdict', { at: diff.getByText('Verdict: normal.') })

    // Backlash, front: a quick pick read as part of a turn, shown in degrees against the 45° limit.
    const frontBacklash = checkCard(page, 'Front', 'Backlash at the prop flange')
    await frontBacklash.getByRole('button', { name: '1/16 turn' }).click()
    await savedIn(frontBacklash)
    await visible(frontBacklash.getByText('22.5°'))
    await visible(frontBacklash.getByText('All good'))

    // Backlash, rear: typed in degrees, over the limit.
    const rearBacklash = checkCard(page, 'Rear', 'Backlash at the prop flange')
    await rearBacklash.getByLabel('Degrees', { exact: true }).check()
    await rearBacklash.getByLabel('Free play at the prop flange (degrees)').fill('60')
    await rearBacklash.getByRole('button', { name: 'Save', exact: true }).click()
    await savedIn(rearBacklash)
    await visible(rearBacklash.getByText('Fix soon'))

    // Every reading above is counted in the bar that stays in view.
    await visible(page.getByText(/^6 of \d+ readings$/))
    await visible(page.getByText('All readings saved'))
    await screenshot(page, 'technician-4-swivel-readings', { at: leak })
    await screenshot(page, 'technician-6-backlash', { at: rearBacklash.getByText('Fix soon') })
    await expectNoSeriousAxe(page, 'technician checks')

    // A photo on the leaking seal's finding.
    const addPhotos = leak.getByRole('button', { name: 'Add photos' })
    await addPhotos.click()
    const dialog = page.getByRole('dialog')
    await visible(dialog.getByRole('heading', { name: 'Swivel housing seal leaking' }))
    const chooser = page.waitForEvent('filechooser')
    await dialog.getByRole('button', { name: 'Choose photos' }).click()
    await (await chooser).setFiles({ name: 'swivel-left.jpg', mimeType: 'image/jpeg', buffer: await workshopPhoto() })
    const thumb = await visible(dialog.getByRole('img', { name: 'Swivel housing seal leaking, photo 1' }), 30_000)
    // Served back by the app (re-encoded, staff only): the picture itself loaded, not just its frame.
    await expect.poll(() => thumb.evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth > 0)).toBe(true)
    await screenshot(page, 'technician-7-photo')
    await expectNoSeriousAxe(page, 'technician photos')
    await dialog.getByRole('button', { name: 'Done' }).click()
    await visible(leak.getByRole('button', { name: 'Photos (1)' }))
  })
})
