export { dotFile } from './dot-writer.js';
