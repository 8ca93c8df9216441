// How the app draws the named parts of a model: a colour token (the app's theme maps each
// token to a colour) and a layer (lower is drawn first, so the disk and bulge show on top of
// the halo). Parts not named here (a Plummer sphere, uploaded particles) take the run's colour.
export const PART_COLOUR_TOKENS = ['sky', 'gold', 'plum', 'amber', 'teal'] as const;
export type PartColourToken = (typeof PART_COLOUR_TOKENS)[number];

export interface PartLook {
  colour: PartColourToken;
  layer: number;
}

const PART_LOOKS: Record<string, PartLook> = {
  halo: { colour: 'plum', layer: 0 },
  disk: { colour: 'sky', layer: 1 },
  bulge: { colour: 'gold', layer: 1 },
  // An encounter's two systems, where a plot shows them whole.
  primary: { colour: 'amber', layer: 1 },
  secondary: { colour: 'teal', layer: 1 },
};

/** The look of a part by its component label; undefined for parts with no look of their own. */
export const partLook = (label: string): PartLook | undefined => PART_LOOKS[label];
