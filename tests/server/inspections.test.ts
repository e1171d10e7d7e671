import exifr from 'exifr'
import sharp from 'sharp'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { checkTemplates } from '../../server/db/schema'
import { starterTemplate } from '../../shared/inspection/starter-template'
import type { Finding, Inspection } from '../../shared/schemas/inspections'
import { makeTestApp } from './helpers/app'
import { type Browser, type Fixture, makeWorkshop, signIn } from './helpers/fixtures'

const t = makeTestApp()
afterAll(() => t.close())

const safety = {
  standsOnFirmLevelGround: true,
  atLiftingPoints: true,
  wheelsChocked: true,
  notOnJackAlone: true,
  standCapacityKg: 3000,
  capacityBasis: 'per-pair',
  standCount: 2,
  axleLoadKg: 1800,
}

async function workshopWithTemplate() {
  const f = await makeWorkshop(t.db)
  await t.db.insert(checkTemplates).values({ workshopId: f.workshop.id, ...starterTemplate })
  return f
}

function jpeg(width: number, height: number, withGps = false): Promise<Buffer> {
  let image = sharp({ create: { width, height, channels: 3, background: '#5a6b3c' } })
  if (withGps) {
    image = image.withExif({
      IFD0: { Make: 'TestCam' },
      IFD3: { GPSLatitudeRef: 'N', GPSLatitude: '54/1 10/1 0/1', GPSLongitudeRef: 'W', GPSLongitude: '2/1 5/1 0/1' },
    })
  }
  return image.jpeg({ quality: 60 }).toBuffer()
}

describe('a technician inspects a job', () => {
  let f: Fixture
  let tech: Browser
  beforeAll(async () => {
    f = await workshopWithTemplate()
    tech = await signIn(t.app, f.technician.email)
  })

  it('starts with the safety step, which must pass before the first reading', async () => {
    const started = await tech.post(`/api/jobs/${f.job.id}/inspections`).expect(201)
    expect(started.body).toMatchObject({ status: 'safety', templateName: starterTemplate.name, technicianId: f.technician.id })
    const early = await tech
      .put(`/api/inspections/${started.body.id}/results`, {
        checkCode: 'swivel-leak',
        position: 'left',
        value: { kind: 'choice', value: 'leak' },
      })
      .expect(409)
    expect(early.body.error.code).toBe('safety_first')
    const weakStands = await tech.put(`/api/inspections/${started.body.id}/safety`, { ...safety, standCapacityKg: 800 }).expect(422)
    expect(weakStands.body.error.issues[0].path).toEqual(['body', 'standCapacityKg'])
    const ok = await tech.put(`/api/inspections/${started.body.id}/safety`, safety).expect(200)
    expect(ok.body.status).toBe('in_progress')
    const again = await tech.post(`/api/jobs/${f.job.id}/inspections`).expect(200)
    expect(again.body.id).toBe(started.body.id)
  })

  it('turns a failed check into a draft finding in the template’s words, and a good reading removes it again', async () => {
    const [current] = (await tech.get(`/api/jobs/${f.job.id}/inspections`).expect(200)).body.items as Inspection[]
    if (!current) throw new Error('no inspection')
    await tech
      .put(`/api/inspections/${current.id}/results`, {
        checkCode: 'diff-backlash',
        position: 'front',
        value: { kind: 'backlash', value: '0.25', unit: 'turn' },
      })
      .expect(200)
    let findings = (await tech.get(`/api/jobs/${f.job.id}/findings`).expect(200)).body.items as Finding[]
    expect(findings).toEqual([
      expect.objectContaining({
        checkCode: 'diff-backlash',
        position: 'front',
        severity: 'soon',
        title: 'Axle backlash excessive',
        measurement: 'Free play 0.25 turn (90°) at the prop flange; limit 45°',
      }),
    ])
    await tech
      .put(`/api/inspections/${current.id}/results`, {
        checkCode: 'diff-backlash',
        position: 'front',
        value: { kind: 'backlash', value: '30', unit: 'degrees' },
      })
      .expect(200)
    findings = (await tech.get(`/api/jobs/${f.job.id}/findings`).expect(200)).body.items as Finding[]
    expect(findings).toEqual([])
  })

  it('refuses a reading for a position the check does not have, or of the wrong kind', async () => {
    const [current] = (await tech.get(`/api/jobs/${f.job.id}/inspections`).expect(200)).body.items as Inspection[]
    const wrongSide = await tech
      .put(`/api/inspections/${current?.id}/results`, {
        checkCode: 'swivel-leak',
        position: 'rear',
        value: { kind: 'choice', value: 'leak' },
      })
      .expect(422)
    expect(wrongSide.body.error.issues[0].path).toEqual(['body', 'position'])
    const wrongKind = await tech
      .put(`/api/inspections/${current?.id}/results`, {
        checkCode: 'swivel-leak',
        position: 'left',
        value: { kind: 'pass-fail', passed: true },
      })
      .expect(422)
    expect(wrongKind.body.error.issues[0].path).toEqual(['body', 'value'])
  })

  it('records the differential operation test and finishes, moving the job on to its estimate', async () => {
    const [current] = (await tech.get(`/api/jobs/${f.job.id}/inspections`).expect(200)).body.items as Inspection[]
    const steps = {
      propTurnsWheelsSameWay: 'yes',
      heldPropOtherWheelOpposite: 'yes',
      heldWheelPropTurns: 'no',
      wheelStiff: 'yes',
      propWontStop: 'no',
    }
    const res = await tech
      .put(`/api/inspections/${current?.id}/results`, {
        checkCode: 'diff-operation',
        position: 'rear',
        value: { kind: 'diff-operation', steps },
      })
      .expect(200)
    expect((res.body as Inspection).results.find((r) => r.checkCode === 'diff-operation')).toMatchObject({
      suggestedSeverity: 'urgent',
      detail: 'Differential unit faulty',
    })
    await tech.post(`/api/inspections/${current?.id}/finish`).expect(200)
    const job = await tech.get(`/api/jobs/${f.job.id}`).expect(200)
    expect(job.body.status).toBe('quoting')
    await tech.put(`/api/inspections/${current?.id}/notes`, { notes: 'late' }).expect(409)
  })
})

describe('findings for the advisor', () => {
  it('lets the advisor edit, add and review findings; technicians cannot review', async () => {
    const f = await workshopWithTemplate()
    const tech = await signIn(t.app, f.technician.email)
    const advisor = await signIn(t.app, f.advisor.email)
    const added = await tech
      .post(`/api/jobs/${f.job.id}/findings`, {
        title: 'Steering damper leaking',
        severity: 'watch',
        explanation: { what: 'The damper is misting oil.', why: 'It calms kickback.', ifLeft: 'Heavier kickback over ruts.' },
      })
      .expect(201)
    await tech.post(`/api/findings/${added.body.id}/review`).expect(403)
    const edited = await advisor
      .put(`/api/findings/${added.body.id}`, { ...added.body, title: 'Steering damper misting oil', id: undefined })
      .expect(200)
    expect(edited.body.title).toBe('Steering damper misting oil')
    const reviewed = await advisor.post(`/api/findings/${added.body.id}/review`).expect(200)
    expect(reviewed.body.reviewed).toBe(true)
  })
})

describe('photos', () => {
  let f: Fixture
  let tech: Browser
  let findingId: string
  beforeAll(async () => {
    f = await workshopWithTemplate()
    tech = await signIn(t.app, f.technician.email)
    const added = await tech.post(`/api/jobs/${f.job.id}/findings`, {
      title: 'UJ worn',
      severity: 'soon',
      explanation: { what: 'Play in the joint.', why: 'Clunks on take-up.', ifLeft: 'The joint can fail.' },
    })
    findingId = added.body.id as string
  })

  const upload = (files: { data: Buffer; name: string }[]) => {
    let req = tech.agent.post(`/api/findings/${findingId}/photos`).set('Origin', 'http://127.0.0.1:3000')
    for (const file of files) req = req.attach('photos', file.data, file.name)
    return req
  }

  it('stores several photos, re-encoded, with every EXIF block including GPS removed', async () => {
    const withGps = await jpeg(640, 480, true)
    expect((await exifr.gps(withGps))?.latitude).toBeCloseTo(54.1667, 3)
    const res = await upload([
      { data: withGps, name: 'a.jpg' },
      { data: await jpeg(320, 240), name: 'b.jpg' },
    ]).expect(201)
    expect(res.body.items).toHaveLength(2)
    const stored = await tech
      .get(res.body.items[0].url)
      .buffer(true)
      .parse((r, cb) => {
        const chunks: Buffer[] = []
        r.on('data', (c: Buffer) => chunks.push(c))
        r.on('end', () => cb(null, Buffer.concat(chunks)))
      })
    expect(stored.status).toBe(200)
    expect(stored.headers['content-type']).toBe('image/jpeg')
    expect(stored.headers['content-disposition']).toMatch(/^inline; filename="photo-/)
    const body = stored.body as Buffer
    expect(await exifr.gps(body).catch(() => undefined)).toBeUndefined()
    expect(await exifr.parse(body).catch(() => undefined)).toBeUndefined()
    const thumb = await tech.get(res.body.items[0].thumbUrl).expect(200)
    expect(thumb.headers['content-type']).toBe('image/jpeg')
  })

  it('refuses a file that is not an image, whatever its name says (415), and saves nothing', async () => {
    const before = (await tech.get(`/api/findings/${findingId}`).expect(200)).body.photos.length
    const res = await upload([
      { data: await jpeg(100, 100), name: 'ok.jpg' },
      { data: Buffer.from('%PDF-1.4 not really a photo'), name: 'photo.jpg' },
    ]).expect(415)
    expect(res.body.error.code).toBe('unsupported_image')
    expect((await tech.get(`/api/findings/${findingId}`).expect(200)).body.photos).toHaveLength(before)
  })

  it('refuses a file over 15 MB (413)', async () => {
    const big = Buffer.concat([await jpeg(50, 50), Buffer.alloc(15 * 1024 * 1024 + 10)])
    const res = await upload([{ data: big, name: 'big.jpg' }]).expect(413)
    expect(res.body.error.code).toBe('photo_too_large')
  })

  it('refuses a 50-megapixel image (422)', async () => {
    const huge = await sharp({ create: { width: 10_000, height: 5_000, channels: 3, background: '#000000' } })
      .jpeg({ quality: 20 })
      .toBuffer()
    const res = await upload([{ data: huge, name: 'huge.jpg' }]).expect(422)
    expect(res.body.error.code).toBe('image_too_large')
  })

  it('answers 404 for another workshop’s photo, finding and inspection', async () => {
    const res = await upload([{ data: await jpeg(120, 90), name: 'c.jpg' }]).expect(201)
    const other = await workshopWithTemplate()
    const stranger = await signIn(t.app, other.owner.email)
    await stranger.get(res.body.items[0].url).expect(404)
    await stranger.get(`/api/findings/${findingId}`).expect(404)
    await stranger.agent
      .post(`/api/findings/${findingId}/photos`)
      .set('Origin', 'http://127.0.0.1:3000')
      .attach('photos', await jpeg(10, 10), 'x.jpg')
      .expect(404)
    await stranger.get(`/api/jobs/${f.job.id}/findings`).expect(404)
  })
})
