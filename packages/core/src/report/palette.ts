import type { TopologyClass } from '../analysis/graph/topology-class.js';

/**
 * The report's own colours and type. Class colours differ in hue and in lightness, so that they
 * stay apart for the common forms of colour blindness and in greyscale print; the heat-map scale
 * is one hue (teal) running from pale to deep, its lightness falling at every step.
 */
export const CLASS_COLOURS: Record<TopologyClass, string> = {
  isolated: '#b9b8ab',
  source: '#e08a2e',
  sink: '#2b6fb3',
  intermediate: '#6b2f7f',
};

/** Tables a filter left out of the measures (they have no topology class). */
export const LEFT_OUT_COLOUR = '#e4e1d8';

/** Label of the left-out category in legends. */
export const LEFT_OUT = 'left out';

/** The sequential scale of the heat maps: one teal, from pale to deep. */
export const HEAT_SCALE = ['#eef6f4', '#c6e3de', '#94c9c1', '#5fa9a3', '#2f8183', '#0e4f52'];

/** Cells whose share is above this (percent of the scale's top) get light text. */
export const HEAT_LIGHT_TEXT_ABOVE = 0.55;

export const INK = '#22262b';
export const MUTED_INK = '#5d6169';
export const RULE = '#d9d6cc';
export const EDGE_COLOUR = '#7d7a70';
export const UPDATE_MARK = '#1b1d21';

/** A system font stack: nothing is loaded from outside the file. */
export const FONT_STACK = "system-ui, 'Noto Sans', 'DejaVu Sans', 'Liberation Sans', Arial, sans-serif";
export const MONO_STACK = "'DejaVu Sans Mono', 'Liberation Mono', Menlo, Consolas, monospace";
