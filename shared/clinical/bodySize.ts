import { requireInRange } from './errors'
import { CLINICAL_LIMITS } from './limits'

interface Size {
  heightCm: number
  weightKg: number
}

function size({ heightCm, weightKg }: Size): Size {
  return {
    heightCm: requireInRange('heightCm', heightCm, CLINICAL_LIMITS.heightCm),
    weightKg: requireInRange('weightKg', weightKg, CLINICAL_LIMITS.weightKg),
  }
}

/** Body-mass index in kg/m² = weight (kg) / height (m)² (common practice, Quetelet). */
export function bmi(input: Size): number {
  const { heightCm, weightKg } = size(input)
  return weightKg / (heightCm / 100) ** 2
}

/** Body surface area in m² by Mosteller RD, N Engl J Med 1987;317:1098: √(cm × kg / 3600). */
export function bsaMosteller(input: Size): number {
  const { heightCm, weightKg } = size(input)
  return Math.sqrt((heightCm * weightKg) / 3600)
}

/**
 * Body surface area in m² by Du Bois D, Du Bois EF, Arch Intern Med 1916;17:863:
 * 0.007184 × kg^0.425 × cm^0.725.
 */
export function bsaDuBois(input: Size): number {
  const { heightCm, weightKg } = size(input)
  return 0.007184 * weightKg ** 0.425 * heightCm ** 0.725
}
