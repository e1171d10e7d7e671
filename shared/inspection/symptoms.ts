/**
 * The symptom guide an advisor reads at intake: what a customer describes, what usually causes it, and
 * which checks of the starter template confirm each cause. Everything here is common workshop
 * practice in our own words, not a maker's diagnostic procedure; the technician's findings decide.
 */

export const symptomCodes = ['loss-of-drive', 'vibration', 'noise', 'knock-on-take-up'] as const
export type SymptomCode = (typeof symptomCodes)[number]

export interface LikelyCause {
  label: string
  /** Why this cause gives this symptom, for the advisor to pass on in plain words. */
  because: string
  /** Codes of checks in the starter template that confirm or rule out this cause. */
  checks: string[]
}

export interface Symptom {
  code: SymptomCode
  label: string
  /** How customers tend to put it, so the advisor recognises it in their words. */
  heardAs: string
  /** Lower-case word stems looked for in a job's concern to point the advisor at this symptom. */
  keywords: string[]
  causes: LikelyCause[]
}

export const symptoms: Symptom[] = [
  {
    code: 'loss-of-drive',
    label: 'Loss of drive',
    heardAs: '“The engine revs but it doesn’t go”, “one wheel just spins”, “a bang and then nothing”.',
    keywords: ['loss of drive', 'lost drive', 'no drive', 'won’t go', "won't go", 'doesn’t move', "doesn't move", 'spins', 'revs but'],
    causes: [
      {
        label: 'Broken half shaft',
        because: 'The shaft that drives the wheel has snapped or its splines have stripped, so the wheel gets no drive.',
        checks: ['half-shaft-turning'],
      },
      {
        label: 'Differential unit failed',
        because: 'With the gears inside broken or seized the axle can no longer pass drive to its wheels.',
        checks: ['diff-operation', 'diff-oil'],
      },
      {
        label: 'CV joint broken',
        because: 'A worn joint can break under load, usually on full lock, and the front wheel loses drive.',
        checks: ['cv-noise', 'cv-boot'],
      },
      {
        label: 'Prop shaft joint failed or come loose',
        because: 'A failed UJ or loose flange stops the prop shaft carrying drive to the axle.',
        checks: ['prop-uj-play', 'prop-flange-bolts'],
      },
      {
        label: 'Centre differential or its lock not working',
        because: 'With the centre diff free and the lock not engaging, drive goes to the axle with least grip.',
        checks: ['tbox-centre-diff'],
      },
    ],
  },
  {
    code: 'vibration',
    label: 'Vibration or judder',
    heardAs: '“Shaking through the floor at speed”, “the steering shudders”, “it judders when pulling away”.',
    keywords: ['vibrat', 'judder', 'shake', 'shaking', 'shudder', 'wobble'],
    causes: [
      {
        label: 'Prop shaft out of balance or a UJ worn',
        because: 'A shaft turning faster than the wheels magnifies any wear or lost balance into a vibration felt in the floor.',
        checks: ['prop-vibration', 'prop-uj-play'],
      },
      {
        label: 'Prop shaft slider worn or fitted the wrong way round',
        because: 'Play in the sliding joint lets the shaft run off centre.',
        checks: ['prop-spline-play', 'prop-slider-orientation'],
      },
      {
        label: 'Wheel hub bearing worn',
        because: 'A loose or rough bearing lets the wheel move and hum at speed.',
        checks: ['hub-bearing-play'],
      },
      {
        label: 'Swivel bearings worn',
        because: 'Play in the swivel lets the wheel shimmy, felt through the steering.',
        checks: ['swivel-bearing-play'],
      },
      {
        label: 'CV joint worn',
        because: 'A worn joint can judder under load, most of all when turning.',
        checks: ['cv-noise'],
      },
    ],
  },
  {
    code: 'noise',
    label: 'Noise',
    heardAs: '“Clicking on full lock”, “a rumble that gets louder with speed”, “a whine from underneath”.',
    keywords: ['noise', 'noisy', 'click', 'rumble', 'whine', 'howl', 'grind', 'growl', 'humming'],
    causes: [
      {
        label: 'CV joint worn',
        because: 'Worn joints click under load on tight turns before they start to knock.',
        checks: ['cv-noise', 'cv-boot'],
      },
      {
        label: 'Wheel hub bearing worn',
        because: 'A worn bearing rumbles and gets louder with road speed.',
        checks: ['hub-bearing-play'],
      },
      {
        label: 'Axle short of oil or its gears worn',
        because: 'Low oil or worn gears and bearings whine on drive or on the overrun.',
        checks: ['diff-oil', 'diff-backlash'],
      },
      {
        label: 'Transfer box output bearing worn',
        because: 'A worn output bearing growls and lets the output seal leak.',
        checks: ['tbox-output-play'],
      },
      {
        label: 'Swivel housing running dry',
        because: 'Without lubricant the joint and bearings inside the swivel grind.',
        checks: ['swivel-lube', 'swivel-leak'],
      },
    ],
  },
  {
    code: 'knock-on-take-up',
    label: 'Knock on take-up of drive',
    heardAs: '“A clunk when pulling away”, “a knock when I let the clutch up or go from drive to reverse”.',
    keywords: ['knock', 'clunk', 'pulling away', 'take up', 'take-up', 'taking up', 'bang when'],
    causes: [
      {
        label: 'Excessive backlash in an axle',
        because: 'Free play in the gears and joints is taken up with a knock each time drive is applied.',
        checks: ['diff-backlash'],
      },
      {
        label: 'Prop shaft UJ worn',
        because: 'Play in the joint closes with a clunk as drive comes on.',
        checks: ['prop-uj-play'],
      },
      {
        label: 'Prop shaft slider splines worn',
        because: 'Rotational play at the slider shows as a knock on take-up.',
        checks: ['prop-spline-play'],
      },
      {
        label: 'Prop shaft flange bolts loose',
        because: 'A loose flange shifts on its bolts when drive is applied.',
        checks: ['prop-flange-bolts'],
      },
      {
        label: 'Backlash between the transfer box outputs',
        because: 'A large lag between the front and rear outputs knocks as drive is taken up.',
        checks: ['tbox-centre-diff', 'tbox-output-play'],
      },
      {
        label: 'Half shaft splines worn',
        because: 'Worn splines at the shaft ends let it turn a little before it drives the wheel.',
        checks: ['half-shaft-turning'],
      },
    ],
  },
]

/** The symptoms a customer's concern seems to describe, in the guide's order; empty when none fits. */
export function symptomsInConcern(concern: string): SymptomCode[] {
  const text = concern.toLowerCase().replace(/\s+/g, ' ')
  return symptoms.filter((s) => s.keywords.some((k) => text.includes(k))).map((s) => s.code)
}
