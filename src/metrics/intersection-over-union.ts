// IoU lives with non-maximum suppression in src/detect, below metrics; re-exported here for metric code.
export { intersectionOverUnion, type Box } from '../detect/intersection-over-union.js';
