export * from './document-types';
export * from './editor-state';
export * from './adjacency';
export * from './adjacency-csv';
export * from './version-diff';
export * from './expression-tex';
export * from './network-layout';
export * from './api-errors';
