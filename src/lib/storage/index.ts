export {
  decodeDiagram, decodeDiagramText, diagramBlobInfo, encodeDiagram, isEncodedDiagram,
  DIAGRAM_FORMAT_VERSION, StoredDiagramError,
  type DiagramBlobInfo, type DiagramLayout, type EncodeOptions,
} from './diagram-codec.ts';
export { predictResiduals, shuffleBytes, undoResiduals, unshuffleBytes, type PredictionOrder } from './float-columns.ts';
