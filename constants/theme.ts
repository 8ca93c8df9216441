// Before the registries below build their schemas: expo-router may load a screen (and so this
// module) ahead of the root layout that sets zod up for the content security policy.
import '../shared/zodSetup';
import { lawColour, partLook, type LawColourToken, type PartColourToken } from '../shared/engine';

// Infall's own look: "Deep Field" — a near-black blue ground, bone-white text,
// one warm accent (the glow of gas falling in) and a cool one for the second law.
// Every colour used on screen comes from here, so the look changes in one place.

export const palette = {
  abyss: '#05070E', // page ground
  hull: '#0C1120', // cards, panels
  deck: '#141B2F', // raised controls, inputs
  seam: '#24304D', // borders, grid lines
  seamBright: '#3A4A72',
  bone: '#ECEFF6', // primary text
  dust: '#98A2BE', // secondary text
  ash: '#626C88', // tertiary text, disabled
  infall: '#F4A259', // primary accent (buttons, the first law of a pair)
  infallDeep: '#B8692B',
  drift: '#63D2C6', // secondary accent (links, the second law of a pair)
  bloom: '#7EDC8E', // good / finished
  flare: '#F2667A', // errors / failed
  corona: '#F3D465', // warnings
  veil: 'rgba(5, 7, 14, 0.72)',
} as const;

export const colors = {
  background: palette.abyss,
  surface: palette.hull,
  surfaceRaised: palette.deck,
  border: palette.seam,
  borderStrong: palette.seamBright,
  text: palette.bone,
  textMuted: palette.dust,
  textFaint: palette.ash,
  accent: palette.infall,
  accentPressed: palette.infallDeep,
  accentText: palette.abyss,
  link: palette.drift,
  ok: palette.bloom,
  danger: palette.flare,
  warning: palette.corona,
  overlay: palette.veil,
} as const;

// One colour per law colour token: each law module names its token, so a law reads the same on
// every plot and badge, and a new law picks a token instead of editing this file.
const LAW_COLOUR_HEX: Record<LawColourToken, string> = {
  periwinkle: '#9FB7FF',
  lavender: '#C59BFF',
  amber: palette.infall,
  // A deeper shade of amber: the same theory in another form.
  ember: '#E07B3A',
  teal: palette.drift,
  rose: '#F28DC0',
};

/** The colour of a law kind; a kind no module has (a stored run from a retired law) is grey. */
export function lawColor(kind: string): string {
  try {
    return LAW_COLOUR_HEX[lawColour(kind)];
  } catch {
    return palette.dust;
  }
}

// One colour per part colour token: a model module gives each named part (a disk, its bulge, a
// live halo) a token and a layer, so a part reads the same in every run's animation.
const PART_COLOUR_HEX: Record<PartColourToken, string> = {
  sky: '#86B4FF',
  gold: '#FFC56E',
  // The dimmest: it belongs to the part drawn first, beneath the rest.
  plum: '#8C6FC9',
  amber: palette.infall,
  teal: palette.drift,
  // Cold gas: green, apart from the stars' blue and gold.
  jade: '#5FC79A',
};

/**
 * The colour of a model part: a named part keeps its own; a run made of one other part keeps
 * the run's colour (its law's); several other parts take the series colours in turn.
 */
export function componentColor(label: string | undefined, index: number, count: number, runColor: string): string {
  const look = label ? partLook(label) : undefined;
  const named = look ? PART_COLOUR_HEX[look.colour] : undefined;
  if (named) return named;
  return count <= 1 ? runColor : seriesColors[index % seriesColors.length];
}

/** Colours for the n-th series of a plot that isn't keyed by law. */
export const seriesColors = [palette.infall, palette.drift, '#9FB7FF', '#F28DC0', palette.corona, palette.bloom, '#C59BFF'];

export const fonts = {
  body: 'SpaceGrotesk_400Regular',
  bodySemi: 'SpaceGrotesk_600SemiBold',
  heading: 'SpaceGrotesk_700Bold',
  mono: 'IBMPlexMono_400Regular',
  monoMedium: 'IBMPlexMono_500Medium',
} as const;

export const space = { xs: 4, sm: 8, md: 12, lg: 16, xl: 24, xxl: 32 } as const;
export const radius = { sm: 6, md: 10, lg: 16, pill: 999 } as const;
export const type = {
  caption: 12,
  small: 13,
  body: 15,
  lead: 17,
  title: 22,
  display: 28,
} as const;

/** Width from which screens use two panes. */
export const WIDE_BREAKPOINT = 1024;
