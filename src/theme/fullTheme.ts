import { definePreset, usePreset } from '@primeuix/themes'
import Aura from '@primeuix/themes/aura'
import { ferrolaneOverrides } from './preset'

/** Ferrolane's whole theme: Aura's tokens for every component, with our overrides laid over them. */
export const FerrolanePreset = definePreset(Aura, ferrolaneOverrides)

let applied = false

/** Swaps the sign-in page's small theme for the whole one, once per page load. */
export function applyFullTheme(): void {
  if (applied) return
  applied = true
  usePreset(FerrolanePreset)
}
