export { graphmlFile } from './graphml-writer.js';
