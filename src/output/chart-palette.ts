// Colours of every chart: the Okabe–Ito palette, distinguishable with the common colour-vision
// deficiencies (Okabe & Ito, "Color Universal Design", J*Fly, 2002/2008; recommended by Wong,
// Nature Methods 8, 441, 2011). Meaning never rests on colour alone: shapes and dashes repeat it.

export const OKABE_ITO = {
  black: '#000000',
  orange: '#E69F00',
  skyBlue: '#56B4E9',
  bluishGreen: '#009E73',
  yellow: '#F0E442',
  blue: '#0072B2',
  vermillion: '#D55E00',
  reddishPurple: '#CC79A7',
} as const;

/** Series colours in order (yellow left out: too light on white for lines). */
export const SERIES_COLOURS: readonly string[] = [
  OKABE_ITO.blue,
  OKABE_ITO.orange,
  OKABE_ITO.bluishGreen,
  OKABE_ITO.vermillion,
  OKABE_ITO.reddishPurple,
  OKABE_ITO.skyBlue,
  OKABE_ITO.black,
];

/** Text and axis colour, and the grey of limit lines. */
export const INK = '#222222';
export const LIMIT_GREY = '#777777';
