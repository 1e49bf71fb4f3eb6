import { definePreset } from '@primeuix/themes'
import type { ExtendedCSS } from '@primeuix/themes/types'
import base from '@primeuix/themes/aura/base'
import auraCss from '@primeuix/themes/aura/css'
import badge from '@primeuix/themes/aura/badge'
import button from '@primeuix/themes/aura/button'
import checkbox from '@primeuix/themes/aura/checkbox'
import confirmdialog from '@primeuix/themes/aura/confirmdialog'
import datatable from '@primeuix/themes/aura/datatable'
import dialog from '@primeuix/themes/aura/dialog'
import iconfield from '@primeuix/themes/aura/iconfield'
import inputnumber from '@primeuix/themes/aura/inputnumber'
import inputtext from '@primeuix/themes/aura/inputtext'
import message from '@primeuix/themes/aura/message'
import paginator from '@primeuix/themes/aura/paginator'
import password from '@primeuix/themes/aura/password'
import progressbar from '@primeuix/themes/aura/progressbar'
import progressspinner from '@primeuix/themes/aura/progressspinner'
import radiobutton from '@primeuix/themes/aura/radiobutton'
import ripple from '@primeuix/themes/aura/ripple'
import select from '@primeuix/themes/aura/select'
import selectbutton from '@primeuix/themes/aura/selectbutton'
import textarea from '@primeuix/themes/aura/textarea'
import toast from '@primeuix/themes/aura/toast'
import togglebutton from '@primeuix/themes/aura/togglebutton'
import virtualscroller from '@primeuix/themes/aura/virtualscroller'

/**
 * Aura's design tokens for the PrimeVue components Isentrope uses and the ones they draw inside them
 * (a select inside the paginator, a toggle button inside the select button, …), not for all ninety:
 * the whole Aura preset is about 100 KB of script on every page. A component missing here renders
 * without its colours and sizes; tests/unit/theme-components.test.ts fails when a view imports a
 * PrimeVue component that has Aura tokens and is not listed.
 * https://primevue.org/theming/styled/#presets
 */
export const THEMED_COMPONENTS = {
  badge,
  button,
  checkbox,
  confirmdialog,
  datatable,
  dialog,
  iconfield,
  inputnumber,
  inputtext,
  message,
  paginator,
  password,
  progressbar,
  progressspinner,
  radiobutton,
  ripple,
  select,
  selectbutton,
  textarea,
  toast,
  togglebutton,
  virtualscroller,
}

// The module's default export is Aura's extra CSS (a string); its type file names a `css` export instead.
const css = auraCss as unknown as ExtendedCSS
const Aura = { ...base, components: THEMED_COMPONENTS, css }

/**
 * Isentrope's own look on PrimeVue's token system: a deep "ink" blue for structure, a burnt
 * copper accent (the colour of a hot nozzle) for actions, warm paper surfaces, small radii.
 * Contrast: copper-700 on white 6.1:1, ink-900 on paper 14:1 (checked with the WCAG formula).
 * https://primevue.org/theming/styled/#definepreset
 */
/** A filled button's colours: white text on `base`, `hover` when pointed at or pressed. */
function solid(base: string, hover: string) {
  return {
    background: base,
    hoverBackground: hover,
    activeBackground: hover,
    borderColor: base,
    hoverBorderColor: hover,
    activeBorderColor: hover,
    color: '#ffffff',
    hoverColor: '#ffffff',
    activeColor: '#ffffff',
  }
}

export const IsentropePreset = definePreset(Aura, {
  primitive: {
    borderRadius: { none: '0', xs: '2px', sm: '3px', md: '4px', lg: '6px', xl: '10px' },
    // Messages and toasts write text in the 600 shade on the 50 shade; the stock yellow and green
    // give about 3:1 there. These darker shades give at least 6:1 (WCAG AA needs 4.5:1).
    yellow: { 600: '#7a4b00', 700: '#5f3a00' },
    green: { 600: '#1f6b3a', 700: '#17532d' },
    red: { 600: '#a01c2c', 700: '#7f1622' },
  },
  semantic: {
    primary: {
      50: '#fcf4ee',
      100: '#f8e3d4',
      200: '#f0c4a6',
      300: '#e59f73',
      400: '#d97c4b',
      500: '#c4612f',
      600: '#a94f24',
      700: '#8c3f1e',
      800: '#6f331b',
      900: '#5a2b18',
      950: '#33160b',
    },
    focusRing: { width: '3px', style: 'solid', color: '#2c62c9', offset: '2px' },
    colorScheme: {
      light: {
        surface: {
          0: '#ffffff',
          50: '#faf8f4',
          100: '#f3efe7',
          200: '#e6e0d4',
          300: '#d2cabb',
          400: '#a9a191',
          500: '#7d7668',
          600: '#5d574c',
          700: '#444038',
          800: '#2e2b26',
          900: '#1f1d1a',
          950: '#12110f',
        },
        primary: {
          color: '{primary.700}',
          contrastColor: '#ffffff',
          hoverColor: '{primary.800}',
          activeColor: '{primary.900}',
        },
        highlight: {
          background: '{primary.50}',
          focusBackground: '{primary.100}',
          color: '{primary.800}',
          focusColor: '{primary.900}',
        },
        formField: {
          borderColor: '{surface.400}',
          hoverBorderColor: '{surface.600}',
          color: '{surface.900}',
          placeholderColor: '{surface.500}',
        },
        text: { color: '{surface.900}', mutedColor: '{surface.600}' },
      },
    },
  },
  components: {
    // Button text in the stock 500 shades gives 3–4.4:1 on white and paper; these shades give at
    // least 5.3:1 (WCAG AA needs 4.5:1), in filled, outlined and text buttons alike.
    button: {
      colorScheme: {
        light: {
          root: {
            success: solid('{green.600}', '{green.700}'),
            warn: solid('{yellow.600}', '{yellow.700}'),
            danger: solid('{red.600}', '{red.700}'),
            info: solid('{sky.700}', '{sky.800}'),
            help: solid('{purple.600}', '{purple.700}'),
          },
          outlined: {
            secondary: { color: '{surface.600}' },
            success: { color: '{green.600}' },
            warn: { color: '{yellow.600}' },
            danger: { color: '{red.600}' },
            info: { color: '{sky.700}' },
            help: { color: '{purple.600}' },
          },
          text: {
            secondary: { color: '{surface.600}' },
            success: { color: '{green.600}' },
            warn: { color: '{yellow.600}' },
            danger: { color: '{red.600}' },
            info: { color: '{sky.700}' },
            help: { color: '{purple.600}' },
          },
        },
      },
    },
    // An unchosen option's words in the stock surface.500 give 4:1 on its grey; surface.700 gives 8:1.
    togglebutton: {
      colorScheme: { light: { root: { color: '{surface.700}' }, icon: { color: '{surface.700}' } } },
    },
    // A toast fits a phone: the stock 25rem is wider than a 375 px screen.
    toast: { root: { width: 'min(25rem, calc(100vw - 2.5rem))' } },
  },
})
