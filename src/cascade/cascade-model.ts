// The model types live in src/model (below every folder that uses them); this name stays for
// the cascade folder's own modules and for callers outside the core.
export * from '../model/cascade-model.js';
