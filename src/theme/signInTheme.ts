import { definePreset } from '@primeuix/themes'
import base from '@primeuix/themes/aura/base'
import button from '@primeuix/themes/aura/button'
import inputtext from '@primeuix/themes/aura/inputtext'
import message from '@primeuix/themes/aura/message'
import { ferrolaneOverrides } from './preset'

/**
 * The first page anyone sees is the sign-in form: Aura's base tokens and only the components that
 * page shows. Every other screen first loads fullTheme.ts (router guard), which swaps in Aura's
 * tokens for all components. Keeps about 100 kB of token tables out of the first load.
 */
export const SignInPreset = definePreset({ ...base, components: { button, inputtext, message } }, ferrolaneOverrides)
