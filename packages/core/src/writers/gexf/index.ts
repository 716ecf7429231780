export { gexfFile, GEXF_TIMES, type GexfTime } from './gexf-writer.js';
