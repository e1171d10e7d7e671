/**
 * Whether the axle stands under a vehicle carry its load. Apart from the inspection rules because
 * the safety check's schema refines with it, and the rules read that schema's types.
 */

/** How a stand's rating is printed: for one stand, or for the pair it is sold as. */
export const capacityBases = ['per-stand', 'per-pair'] as const
export type CapacityBasis = (typeof capacityBases)[number]

export interface StandsLoad {
  standCapacityKg: number
  capacityBasis: CapacityBasis
  standCount: number
  axleLoadKg: number
}

export interface StandsAssessment {
  covered: boolean
  totalCapacityKg: number
  message: string
}

/**
 * The stands under the vehicle must be rated above the load they carry (common practice; the
 * technician's training and local rules decide). A rating per pair counts once for every two stands.
 */
export function assessStands(s: StandsLoad): StandsAssessment {
  const units = s.capacityBasis === 'per-stand' ? s.standCount : Math.floor(s.standCount / 2)
  const total = s.standCapacityKg * units
  const covered = total >= s.axleLoadKg
  return {
    covered,
    totalCapacityKg: total,
    message: covered
      ? `The stands are rated ${total} kg together, above the ${s.axleLoadKg} kg axle load.`
      : `The stands are rated ${total} kg together, less than the ${s.axleLoadKg} kg axle load. Use stands with a higher rating before going under the vehicle.`,
  }
}
